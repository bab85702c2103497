import { AreaLoading } from "@/components/shell/area-loading";

export default function ServiceLoading() {
  return <AreaLoading areaKey="service" />;
}
