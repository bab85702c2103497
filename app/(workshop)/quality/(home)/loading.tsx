import { AreaLoading } from "@/components/shell/area-loading";

export default function QualityLoading() {
  return <AreaLoading areaKey="quality" />;
}
