import type { Metadata } from "next";
import { DealerTable, FinishTable, ModelTable } from "@/components/workshop/reference-tables";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { listDealers, listFinishes, listModels } from "@/lib/workshop/queries";
import { recentPairs } from "@/lib/genealogy/queries";
import { formatDate } from "@/lib/format";
import { SerialLink } from "@/components/register/serial-link";
import { stateLabel } from "@/lib/vocabulary/item-kinds";
import { DataTable } from "@/components/ui/data-table";

export const metadata: Metadata = { title: "Register" };

export default async function RegisterPage() {
  await requirePage("register.read");
  const db = getDb();
  const [models, finishes, dealers, pairs] = await Promise.all([listModels(db), listFinishes(db), listDealers(db), recentPairs(db)]);
  const area = areaByKey("register");
  return (
    <div className="flex flex-col gap-6" data-testid="area-register">
      <PageHeader title={area.label} lead={area.summary} />
      <Panel title="Latest pairs">
        <p className="mb-3 text-ink-soft">Search any serial with the box at the top, or scan its label.</p>
        <DataTable
          caption="Latest pairs"
          testId="pair-table"
          initialSort={{ key: "created", dir: "desc" }}
          columns={[
            { key: "identity", label: "Pair" },
            { key: "model", label: "Model" },
            { key: "finish", label: "Finish" },
            { key: "created", label: "Begun" },
            { key: "state", label: "State" },
          ]}
          rows={pairs.map((p) => ({
            id: p.id,
            cells: {
              identity: { value: p.identity, display: <SerialLink identity={p.identity} /> },
              model: { value: p.model ?? "" },
              finish: { value: p.finish ?? "" },
              created: { value: p.createdAt.getTime(), display: formatDate(p.createdAt) },
              state: { value: stateLabel(p.state) },
            },
          }))}
        />
      </Panel>
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
