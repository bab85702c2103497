import type { Metadata } from "next";
import { DealerTable, FinishTable, ModelTable } from "@/components/workshop/reference-tables";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { listFinishes, listModels, recentDealers } from "@/lib/workshop/queries";
import Link from "next/link";
import { paths } from "@/lib/paths";
import { recentPairs } from "@/lib/genealogy/queries";
import { formatDate } from "@/lib/format";
import { SerialLink } from "@/components/register/serial-link";
import { stateLabel } from "@/lib/vocabulary/item-kinds";
import { DataTable } from "@/components/ui/data-table";

export const metadata: Metadata = { title: "Register" };

// A workshop sells through hundreds of dealers over the years: the register's front page shows
// those it shipped to lately, and every dealer is one link away.
const RECENT_DEALERS = 20;

export default async function RegisterPage() {
  await requirePage("register.read");
  const db = getDb();
  const [models, finishes, dealers, pairs] = await Promise.all([listModels(db), listFinishes(db), recentDealers(db, RECENT_DEALERS), recentPairs(db)]);
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
      <Panel
        title="Dealers shipped to lately"
        actions={
          <Link className="font-bold text-leaf-dark underline" href={paths.dealers} data-testid="every-dealer-link">
            Every dealer ({dealers.total.toLocaleString("en")})
          </Link>
        }
      >
        {dealers.dealers.length ? (
          <>
            <p className="mb-3 text-sm text-ink-soft">The dealers of the latest shipments, the most recent first. Find any dealer by name, code or town with the search box, or in the list of every dealer.</p>
            <DealerTable dealers={dealers.dealers} sorted="as given" />
          </>
        ) : (
          <p className="text-ink-soft">
            Nothing has shipped yet.{" "}
            <Link className="font-bold text-leaf-dark underline" href={paths.dealers}>
              Every dealer
            </Link>
          </p>
        )}
      </Panel>
    </div>
  );
}
