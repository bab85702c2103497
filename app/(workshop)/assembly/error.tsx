"use client";
import { AreaError } from "@/components/shell/area-error";

export default function AssemblyError({ error, retry }: { error: unknown; retry: () => void }) {
  return <AreaError areaKey="assembly" error={error} retry={retry} />;
}
