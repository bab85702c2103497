import { AreaLoading } from "@/components/shell/area-loading";

export default function PackingLoading() {
  return <AreaLoading areaKey="packing" />;
}
