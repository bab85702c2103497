import { AreaLoading } from "@/components/shell/area-loading";

export default function LabLoading() {
  return <AreaLoading areaKey="lab" />;
}
