import { AreaNotFound, type NotFoundThing } from "@/components/shell/area-not-found";
import { paths } from "@/lib/paths";

// The records of this area a page may not find, by where they live.
const THINGS: NotFoundThing[] = [
  { under: paths.labBatch(""), what: "batch", serial: true },
];

export default function LabNotFound() {
  return <AreaNotFound areaKey="lab" things={THINGS} />;
}
