"use client";
import { AreaError } from "@/components/shell/area-error";

export default function PackingError({ error, retry }: { error: unknown; retry: () => void }) {
  return <AreaError areaKey="packing" error={error} retry={retry} />;
}
