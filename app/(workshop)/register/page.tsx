import type { Metadata } from "next";
import { DealerTable, FinishTable, ModelTable } from "@/components/workshop/reference-tables";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { listDealers, listFinishes, listModels } from "@/lib/workshop/queries";

export const metadata: Metadata = { title: "Register" };

export default async function RegisterPage() {
  await requirePage("register.read");
  const db = getDb();
  const [models, finishes, dealers] = await Promise.all([listModels(db), listFinishes(db), listDealers(db)]);
  const area = areaByKey("register");
  return (
    <div className="flex flex-col gap-6" data-testid="area-register">
      <PageHeader title={area.label} lead={area.summary} />
      <Panel title="Models">
        <ModelTable models={models} />
      </Panel>
      <Panel title="Finishes">
        <FinishTable finishes={finishes} />
      </Panel>
      <Panel title="Dealers">
        <DealerTable dealers={dealers} />
      </Panel>
    </div>
  );
}
