import type { Metadata } from "next";
import { AreaOverview } from "@/components/shell/area-overview";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";

export const metadata: Metadata = { title: "Quality" };

export default async function Page() {
  await requirePage("quality.work");
  return <AreaOverview area={areaByKey("quality")} />;
}
