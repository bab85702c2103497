"use client";
import { AreaError } from "@/components/shell/area-error";

export default function VeneerError({ error, retry }: { error: unknown; retry: () => void }) {
  return <AreaError areaKey="veneer" error={error} retry={retry} />;
}
