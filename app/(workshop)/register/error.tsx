"use client";
import { AreaError } from "@/components/shell/area-error";

export default function RegisterError({ error, retry }: { error: unknown; retry: () => void }) {
  return <AreaError areaKey="register" error={error} retry={retry} />;
}
