import type { Metadata } from "next";
import { AreaOverview } from "@/components/shell/area-overview";
import { DealerTable } from "@/components/workshop/reference-tables";
import { Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { listDealers } from "@/lib/workshop/queries";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";

export const metadata: Metadata = { title: "Dispatch" };

export default async function Page() {
  await requirePage("packing.work");
  const dealers = await listDealers(getDb());
  return (
    <AreaOverview area={areaByKey("packing")}>
      <Panel title="Dealers we ship to">
        <DealerTable dealers={dealers} />
      </Panel>
    </AreaOverview>
  );
}
