"use client";
import { AreaError } from "@/components/shell/area-error";

export default function QualityError({ error, retry }: { error: unknown; retry: () => void }) {
  return <AreaError areaKey="quality" error={error} retry={retry} />;
}
