"use client";
import { AreaError } from "@/components/shell/area-error";

export default function ServiceError({ error, retry }: { error: unknown; retry: () => void }) {
  return <AreaError areaKey="service" error={error} retry={retry} />;
}
