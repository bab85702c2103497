"use client";
import { AreaError } from "@/components/shell/area-error";

export default function AdminError({ error, retry }: { error: unknown; retry: () => void }) {
  return <AreaError areaKey="admin" error={error} retry={retry} />;
}
