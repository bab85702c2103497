import { AreaNotFound, type NotFoundThing } from "@/components/shell/area-not-found";
import { paths } from "@/lib/paths";

// The records of this area a page may not find, by where they live.
const THINGS: NotFoundThing[] = [
  { under: paths.item(""), what: "item", serial: true },
  { under: paths.dealer(""), what: "dealer", serial: true },
  { under: paths.owner(""), what: "owner" },
];

export default function RegisterNotFound() {
  return <AreaNotFound areaKey="register" things={THINGS} />;
}
