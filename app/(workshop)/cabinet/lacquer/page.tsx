import { paths } from "@/lib/paths";
import type { Metadata } from "next";
import { PrintLabels } from "@/components/register/print-labels";
import { SerialLink } from "@/components/register/serial-link";
import { BackLink } from "@/components/ui/back-link";
import { DataTable } from "@/components/ui/data-table";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { lacquerCabinetsWaiting } from "@/lib/cabinets/lacquer";
import { formatDay } from "@/lib/format";
import { stateLabel } from "@/lib/vocabulary/item-kinds";
import { listFinishes, listModels } from "@/lib/workshop/queries";
import { MakeForm } from "./make-form";

export const metadata: Metadata = { title: "Lacquer cabinets" };

export default async function Page({ searchParams }: { searchParams: Promise<{ made?: string }> }) {
  const user = await requirePage("cabinet.lacquer");
  const db = getDb();
  const [modelRows, finishRows] = await Promise.all([listModels(db), listFinishes(db)]);
  const made = ((await searchParams).made ?? "").split(",").filter(Boolean);
  // Lacquer cabinets not yet in a pair: the ones assembly will pair when they finish their route.
  const waiting = await lacquerCabinetsWaiting(db);
  return (
    <div className="flex flex-col gap-6" data-testid="lacquer-page">
      <BackLink href={user.permissions.has("cabinet.work") ? paths.cabinet : paths.veneer}>{user.permissions.has("cabinet.work") ? "Cabinet shop" : "Veneer room"}</BackLink>
      <PageHeader title="Lacquer cabinets" lead="Cabinets for a lacquer colour are made several at a time, without veneer leaves. Each travels the cabinet route on its own; assembly pairs two of one model and colour when both have finished." />
      {made.length ? (
        <Panel title={`${made.length} cabinets made`}>
          <Notice tone="leaf" className="mb-4" testId="lacquer-made">
            {made.join(", ")}
          </Notice>
          <PrintLabels identities={made} />
        </Panel>
      ) : null}
      <Panel title="Make lacquer cabinets">
        <MakeForm
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
