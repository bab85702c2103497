import type { ReactNode } from "react";
import { requirePage } from "@/lib/auth/guard";

// The area's permission is checked here, outside the loading boundary, so a refusal is answered
// with its 403 before anything streams (a page under loading.tsx would answer 200).
export default async function CabinetHomeLayout({ children }: { children: ReactNode }) {
  await requirePage("cabinet.work");
  return children;
}
