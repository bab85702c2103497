import type { Metadata } from "next";
import { AreaOverview } from "@/components/shell/area-overview";
import { ModelTable } from "@/components/workshop/reference-tables";
import { Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { listModels } from "@/lib/workshop/queries";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";

export const metadata: Metadata = { title: "Lab" };

export default async function Page() {
  await requirePage("lab.work");
  const models = await listModels(getDb());
  return (
    <AreaOverview area={areaByKey("lab")}>
      <Panel title="Matching limits per model">
        <ModelTable models={models} show="tolerances" />
      </Panel>
    </AreaOverview>
  );
}
