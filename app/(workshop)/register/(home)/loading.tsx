import { AreaLoading } from "@/components/shell/area-loading";

export default function RegisterLoading() {
  return <AreaLoading areaKey="register" />;
}
