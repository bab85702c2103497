import type { Metadata } from "next";
import { AreaOverview } from "@/components/shell/area-overview";
import { FinishTable, ModelTable } from "@/components/workshop/reference-tables";
import { Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { listFinishes, listModels } from "@/lib/workshop/queries";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";

export const metadata: Metadata = { title: "Veneer room" };

export default async function Page() {
  await requirePage("veneer.work");
  const db = getDb();
  const [models, finishes] = await Promise.all([listModels(db), listFinishes(db)]);
  return (
    <AreaOverview area={areaByKey("veneer")}>
      <Panel title="Leaves each model takes">
        <ModelTable models={models} show="veneer" />
      </Panel>
      <Panel title="Veneer species">
        <FinishTable finishes={finishes.filter((f) => f.kind === "veneer")} />
      </Panel>
    </AreaOverview>
  );
}
