import { AreaNotFound, type NotFoundThing } from "@/components/shell/area-not-found";
import { paths } from "@/lib/paths";

// The records of this area a page may not find, by where they live.
const THINGS: NotFoundThing[] = [
  { under: paths.assemblyPair(""), what: "pair", serial: true },
];

export default function AssemblyNotFound() {
  return <AreaNotFound areaKey="assembly" things={THINGS} />;
}
