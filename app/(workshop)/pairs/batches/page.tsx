import type { Metadata } from "next";
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import { PrintLabels } from "@/components/register/print-labels";
import { SerialLink } from "@/components/register/serial-link";
import { BackLink } from "@/components/ui/back-link";
import { DataTable } from "@/components/ui/data-table";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { finishes, items, models } from "@/db/schema";
import { requirePage } from "@/lib/auth/guard";
import { formatDay } from "@/lib/format";
import { stateLabel } from "@/lib/genealogy/kinds";
import { listFinishes, listModels } from "@/lib/workshop/queries";
import { BatchForm } from "./batch-form";

export const metadata: Metadata = { title: "Lacquer cabinet batches" };

export default async function Page({ searchParams }: { searchParams: Promise<{ made?: string }> }) {
  const user = await requirePage("cabinet.batch");
  const db = getDb();
  const [modelRows, finishRows] = await Promise.all([listModels(db), listFinishes(db)]);
  const made = ((await searchParams).made ?? "").split(",").filter(Boolean);
  // Lacquer cabinets not yet in a pair, oldest first: the ones assembly will pair next.
  const waiting = await db
    .select({ identity: items.identity, state: items.state, createdAt: items.createdAt, model: models.code, colour: finishes.name })
    .from(items)
    .innerJoin(finishes, eq(finishes.id, items.finishId))
    .leftJoin(models, eq(models.id, items.modelId))
    .where(and(eq(items.kind, "cabinet"), eq(finishes.kind, "lacquer"), isNull(sql`(SELECT 1 FROM links l WHERE l.child_id = ${items.id} AND l.ended_at IS NULL LIMIT 1)`)))
    .orderBy(desc(items.createdAt))
    .limit(300);
  return (
    <div className="flex flex-col gap-6" data-testid="batches-page">
      <BackLink href={user.permissions.has("cabinet.work") ? "/pairs" : "/flitches"}>{user.permissions.has("cabinet.work") ? "Cabinet shop" : "Veneer room"}</BackLink>
      <PageHeader title="Lacquer cabinet batches" lead="Cabinets for a lacquer colour are made in batches, without veneer leaves. Assembly pairs them two at a time when they have finished their route." />
      {made.length ? (
        <Panel title={`${made.length} cabinets made`}>
          <Notice tone="leaf" className="mb-4" testId="batch-made">
            {made.join(", ")}
          </Notice>
          <PrintLabels identities={made} station="cabinet" />
        </Panel>
      ) : null}
      <Panel title="Start a batch">
        <BatchForm
          models={modelRows.filter((m) => m.active).map((m) => ({ value: m.id, label: `${m.code} ${m.name}` }))}
          colours={finishRows.filter((f) => f.kind === "lacquer" && f.active).map((f) => ({ value: f.id, label: f.detail ? `${f.name} (${f.detail})` : f.name }))}
        />
      </Panel>
      <Panel title="Lacquer cabinets not yet paired">
        <DataTable
          caption="Lacquer cabinets not yet in a pair"
          empty="None waiting."
          testId="unpaired-cabinets"
          initialSort={{ key: "made", dir: "desc" }}
          columns={[
            { key: "identity", label: "Cabinet" },
            { key: "model", label: "Model" },
            { key: "colour", label: "Colour" },
            { key: "state", label: "State" },
            { key: "made", label: "Made" },
          ]}
          rows={waiting.map((c) => ({
            id: c.identity,
            cells: {
              identity: { value: c.identity, display: <SerialLink identity={c.identity} /> },
              model: { value: c.model ?? "" },
              colour: { value: c.colour },
              state: { value: stateLabel(c.state) },
              made: { value: c.createdAt.getTime(), display: formatDay(c.createdAt) },
            },
          }))}
        />
      </Panel>
    </div>
  );
}
