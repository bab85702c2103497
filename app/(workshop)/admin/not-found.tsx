import { AreaNotFound, type NotFoundThing } from "@/components/shell/area-not-found";
import { paths } from "@/lib/paths";

// The records of this area a page may not find, by where they live.
const THINGS: NotFoundThing[] = [
  { under: `${paths.adminUsers}/`, what: "user" },
  { under: `${paths.adminMail}/`, what: "message" },
  { under: `${paths.adminRoutes}/`, what: "model", serial: true },
];

export default function AdminNotFound() {
  return <AreaNotFound areaKey="admin" things={THINGS} />;
}
