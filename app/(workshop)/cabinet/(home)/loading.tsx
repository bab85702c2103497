import { AreaLoading } from "@/components/shell/area-loading";

export default function CabinetLoading() {
  return <AreaLoading areaKey="cabinet" />;
}
