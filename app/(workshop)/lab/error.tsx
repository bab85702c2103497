"use client";
import { AreaError } from "@/components/shell/area-error";

export default function LabError({ error, retry }: { error: unknown; retry: () => void }) {
  return <AreaError areaKey="lab" error={error} retry={retry} />;
}
