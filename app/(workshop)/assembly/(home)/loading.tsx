import { AreaLoading } from "@/components/shell/area-loading";

export default function AssemblyLoading() {
  return <AreaLoading areaKey="assembly" />;
}
