import { AreaNotFound } from "@/components/shell/area-not-found";

export default function QualityNotFound() {
  return <AreaNotFound areaKey="quality" />;
}
