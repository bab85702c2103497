import type { Metadata } from "next";
import { AreaOverview } from "@/components/shell/area-overview";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";

export const metadata: Metadata = { title: "Service desk" };

export default async function Page() {
  await requirePage("service.work");
  return <AreaOverview area={areaByKey("service")} />;
}
