import { AreaLoading } from "@/components/shell/area-loading";

export default function VeneerLoading() {
  return <AreaLoading areaKey="veneer" />;
}
