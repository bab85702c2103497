import { AreaLoading } from "@/components/shell/area-loading";

export default function AdminLoading() {
  return <AreaLoading areaKey="admin" />;
}
