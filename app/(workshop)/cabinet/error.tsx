"use client";
import { AreaError } from "@/components/shell/area-error";

export default function CabinetError({ error, retry }: { error: unknown; retry: () => void }) {
  return <AreaError areaKey="cabinet" error={error} retry={retry} />;
}
