import type { Metadata } from "next";
import { AreaOverview } from "@/components/shell/area-overview";
import { ModelTable } from "@/components/workshop/reference-tables";
import { Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { listModels } from "@/lib/workshop/queries";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";

export const metadata: Metadata = { title: "Assembly" };

export default async function Page() {
  await requirePage("assembly.work");
  const models = await listModels(getDb());
  return (
    <AreaOverview area={areaByKey("assembly")}>
      <Panel title="Models and their drive-unit positions">
        <ModelTable models={models} />
      </Panel>
    </AreaOverview>
  );
}
