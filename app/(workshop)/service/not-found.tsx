import { AreaNotFound } from "@/components/shell/area-not-found";

export default function ServiceNotFound() {
  return <AreaNotFound areaKey="service" />;
}
