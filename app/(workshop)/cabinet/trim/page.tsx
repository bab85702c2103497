import { paths } from "@/lib/paths";
import type { Metadata } from "next";
import { PrintLabels } from "@/components/register/print-labels";
import { SerialLink } from "@/components/register/serial-link";
import { SafetyCautions } from "@/components/shell/safety-cautions";
import { BackLink } from "@/components/ui/back-link";
import { DataTable } from "@/components/ui/data-table";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { formatDay } from "@/lib/format";
import { allTrimPositions, trimPartsInShop } from "@/lib/trim/receive";
import { stateLabel } from "@/lib/vocabulary/item-kinds";
import { listModels } from "@/lib/workshop/queries";
import { ReceiveForm } from "./receive-form";

export const metadata: Metadata = { title: "Trim parts" };

const STATE_WORD: Record<string, string> = { received: "received, route not started", in_route: "on its route", finished: "route finished, ready for assembly" };

export default async function Page({ searchParams }: { searchParams: Promise<{ received?: string; lot?: string }> }) {
  await requirePage("cabinet.work");
  const db = getDb();
  const [modelRows, positions, parts] = await Promise.all([listModels(db), allTrimPositions(db), trimPartsInShop(db)]);
  const search = await searchParams;
  const received = (search.received ?? "").split(",").filter(Boolean);
  const models = modelRows
    .filter((m) => m.active && positions.some((p) => p.modelId === m.id))
    .map((m) => ({ value: m.id, label: `${m.code} ${m.name}`, positions: positions.filter((p) => p.modelId === m.id).map((p) => ({ value: p.position, label: `${p.label} (${p.position}), ${p.count} per speaker` })) }));
  const positionLabel = new Map(positions.map((p) => [`${p.modelId}:${p.position}`, p.label]));
  return (
    <div className="flex flex-col gap-6" data-testid="trim-page">
      <BackLink href={paths.cabinet}>Cabinet shop</BackLink>
      <PageHeader title="Trim parts" lead="Machined metal trim (top housings, plinths, bezels) arrives from a supplier in lots. Each part gets a serial and a label, is sanded, painted and polished by hand on the trim route, and is fitted at assembly." />
      {received.length ? (
        <Panel title={`${received.length} trim part${received.length === 1 ? "" : "s"} received${search.lot ? ` from lot ${search.lot}` : ""}`}>
          <Notice tone="leaf" className="mb-4" testId="trim-received">
            {received.join(", ")}
          </Notice>
          <PrintLabels identities={received} />
        </Panel>
      ) : null}
      <Panel title="Receive a delivery">
        <div className="mb-4">
          <SafetyCautions cautions={["Machined edges are sharp: wear cut-resistant gloves when unpacking housings and plinths.", "Boxes of metal parts are heavy: lift with help or a trolley."]} />
        </div>
        {models.length ? <ReceiveForm models={models} /> : <Notice tone="info">No model has trim parts yet: an administrator gives a model its trim positions.</Notice>}
      </Panel>
      <Panel title="Trim parts in the shop">
        <DataTable
          caption="Trim parts not yet fitted"
          empty="No trim part waiting."
          testId="trim-parts"
          initialSort={{ key: "received", dir: "desc" }}
          columns={[
            { key: "identity", label: "Trim part" },
            { key: "model", label: "Model" },
            { key: "position", label: "Position" },
            { key: "lot", label: "Supplier's lot" },
            { key: "state", label: "Where it is" },
            { key: "received", label: "Received" },
          ]}
          rows={parts.map((p) => ({
            id: p.identity,
            cells: {
              identity: { value: p.identity, display: <SerialLink identity={p.identity} href={paths.cabinetPair(p.identity)} /> },
              model: { value: p.model },
              position: { value: positionLabel.get(`${p.modelId}:${p.position}`) ?? p.position ?? "" },
              lot: { value: String(p.attrs.lot ?? ""), display: typeof p.attrs.lot === "string" ? <SerialLink identity={p.attrs.lot} /> : "" },
              state: { value: STATE_WORD[p.state] ?? stateLabel(p.state) },
              received: { value: p.createdAt.getTime(), display: formatDay(p.createdAt) },
            },
          }))}
        />
      </Panel>
    </div>
  );
}
