import { paths } from "@/lib/paths";
import type { Metadata } from "next";
import { leafList } from "@/lib/veneer/plan";
import { notFound } from "next/navigation";
import { EventTable } from "@/components/shell/event-table";
import { SafetyCautions } from "@/components/shell/safety-cautions";
import { SerialLink } from "@/components/register/serial-link";
import { PlanPicture } from "@/components/veneer/plan-picture";
import { Badge } from "@/components/ui/badge";
import { BackLink } from "@/components/ui/back-link";
import { buttonClasses } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { DEFECT_KINDS } from "@/lib/vocabulary/defects";
import { areaByKey } from "@/lib/areas";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { recentEvents } from "@/lib/events/queries";
import { formatCalendarDay } from "@/lib/format";
import { stateLabel } from "@/lib/vocabulary/item-kinds";
import { flitchView, planView, specFor } from "@/lib/veneer/flitches";
import { listModels } from "@/lib/workshop/queries";
import { ConfirmRuns } from "./confirm-runs";
import { CsvImport } from "./csv-import";
import { LeafTable, type LeafRowData } from "./leaf-table";
import { FlitchPhotos } from "./photos";

export async function generateMetadata({ params }: { params: Promise<{ identity: string }> }): Promise<Metadata> {
  return { title: `Flitch ${pageParam((await params).identity)}` };
}

export default async function FlitchPage({ params, searchParams }: { params: Promise<{ identity: string }>; searchParams: Promise<{ model?: string; reserve?: string; received?: string }> }) {
  const user = await requirePage("veneer.work");
  const db = getDb();
  const identity = pageParam((await params).identity);
  const view = await flitchView(db, identity);
  if (!view) notFound();
  const sp = await searchParams;
  const models = (await listModels(db)).filter((m) => m.active);
  const model = models.find((m) => m.code === sp.model) ?? models[0];
  const reserveParam = Number(sp.reserve ?? "1");
  const reservePerPair = Number.isInteger(reserveParam) && reserveParam >= 0 && reserveParam <= 4 ? reserveParam : 1;
  const spec = model ? specFor(model, reservePerPair) : null;
  const planned = spec ? planView(view, spec) : null;
  const unmeasured = view.leaves.filter((l) => l.lengthMm === null || l.widthMm === null).length;
  const events = await recentEvents(db, { viewer: user, subjects: { kind: "item", ids: [view.item.id, ...view.leaves.map((l) => l.id)] }, limit: 60 });
  const area = areaByKey("veneer");

  const rows: LeafRowData[] = view.leaves.map((l) => ({
    id: l.id,
    seq: l.seq,
    lengthMm: l.lengthMm,
    widthMm: l.widthMm,
    usable: l.usable,
    state: l.state,
    defects: l.defects,
    status: l.spent
      ? `taken off ${l.allocation?.cabinet ?? "its cabinet"} (re-veneered)`
      : l.allocation
        ? l.allocation.role === "face"
          ? `${l.allocation.position} of ${l.allocation.cabinet ?? ""}${l.allocation.orientation === "turned" ? ", turned" : ""} · ${l.allocation.pair}`
          : `reserve for ${l.allocation.pair}`
        : null,
    locked: l.allocation?.role === "face",
    short: Boolean(spec && l.lengthMm !== null && l.widthMm !== null && (l.lengthMm < spec.minLengthMm || l.widthMm < spec.minWidthMm)),
  }));

  return (
    <div className="flex flex-col gap-6" data-testid="flitch-page">
      <BackLink href={paths.veneer}>Veneer room</BackLink>
      <PageHeader
        title={<span className="serial" data-testid="flitch-identity">{view.item.identity}</span>}
        lead={`${view.finish.name}${view.finish.detail ? ` (${view.finish.detail})` : ""} · ${view.intake.leafCount} leaves of ${view.intake.leafThicknessMm} mm · log ${view.intake.logReference} · from ${view.intake.supplier} · received ${formatCalendarDay(view.intake.receivedOn)}`}
        actions={<Badge tone="walnut">{stateLabel(view.item.state)}</Badge>}
      />
      {sp.received ? (
        <Notice tone="leaf" testId="received-notice">
          Flitch received with its {view.intake.leafCount} leaves. Measure them below (or import a CSV), mark any defects, then plan the pairs.
        </Notice>
      ) : null}
      <SafetyCautions cautions={area.cautions} />

      <Panel title="Plan the pairs">
        <form method="get" className="mb-4 flex flex-wrap items-end gap-4" data-testid="plan-controls">
          <label className="flex min-w-0 max-w-full flex-col gap-1">
            <span className="font-bold">Model</span>
            <select name="model" defaultValue={model?.code} className="h-12 w-full min-w-0 max-w-full rounded-md border border-line-strong bg-surface px-3">
              {models.map((m) => (
                <option key={m.id} value={m.code}>
                  {m.code} {m.name}: {m.leavesPerFace} leaves a face, at least {m.minLeafLengthMm} × {m.minLeafWidthMm} mm
                </option>
              ))}
            </select>
          </label>
          <label className="flex min-w-0 max-w-full flex-col gap-1">
            <span className="font-bold">Reserve leaves per pair</span>
            <select name="reserve" defaultValue={String(reservePerPair)} className="h-12 w-full max-w-full rounded-md border border-line-strong bg-surface px-3">
              {[0, 1, 2, 3, 4].map((n) => (
                <option key={n} value={n}>
                  {n}
                </option>
              ))}
            </select>
          </label>
          <button type="submit" className={buttonClasses("secondary")}>
            Draw the plan
          </button>
        </form>
        {unmeasured ? (
          <Notice tone="caution" className="mb-4">
            {unmeasured} of {view.intake.leafCount} leaves are not measured yet; the plan leaves them out (they break runs) until they are.
          </Notice>
        ) : null}
        {planned && model ? (
          <>
            <PlanPicture
              leaves={view.leaves.map((l) => ({ seq: l.seq, lengthMm: l.lengthMm, widthMm: l.widthMm, usable: l.usable, defects: l.defects, takenBy: l.allocation?.pair ?? (l.spent ? "spent" : null) }))}
              plan={planned.plan}
              yieldFigures={planned.figures}
              minLengthMm={model.minLeafLengthMm}
              minWidthMm={model.minLeafWidthMm}
              leavesPerFace={model.leavesPerFace}
              reservePerPair={reservePerPair}
              title={`${model.code} pairs from ${view.item.identity}`}
            />
            {planned.plan.runs.length ? (
              <div className="mt-6">
                <ConfirmRuns flitch={view.item.identity} flitchId={view.item.id} modelId={model.id} modelName={`${model.code} ${model.name}`} reservePerPair={reservePerPair} runs={planned.plan.runs} />
              </div>
            ) : null}
          </>
        ) : (
          <p className="text-ink-soft">No active model to plan for.</p>
        )}
      </Panel>

      <Panel title="Leaves in slicing order">
        <p className="mb-3 text-ink-soft">Edit a row and save it. A leaf laid on a cabinet keeps its record as it was.</p>
        <LeafTable flitch={view.item.identity} leaves={rows} kinds={DEFECT_KINDS} />
      </Panel>

      <div className="grid gap-6 lg:grid-cols-2">
        <Panel title="Import leaves from a CSV">
          <CsvImport flitch={view.item.identity} leafCount={view.intake.leafCount} />
        </Panel>
        <Panel title="Photos">
          <FlitchPhotos flitch={view.item} leaves={view.leaves.map((l) => ({ id: l.id, identity: l.identity, seq: l.seq }))} />
        </Panel>
      </div>

      <Panel title="Pairs from this flitch">
        <PairsFromFlitch leaves={view.leaves} />
      </Panel>

      <Panel title="History">
        <EventTable events={events} caption={`Events of ${view.item.identity} and its leaves`} />
      </Panel>
    </div>
  );
}

function PairsFromFlitch({ leaves }: { leaves: Awaited<ReturnType<typeof flitchView>> extends infer V ? (V extends { leaves: infer L } ? L : never) : never }) {
  const pairs = new Map<string, { face: number[]; reserve: number[] }>();
  for (const l of leaves) {
    if (!l.allocation) continue;
    const p = pairs.get(l.allocation.pair) ?? { face: [], reserve: [] };
    (l.allocation.role === "face" ? p.face : p.reserve).push(l.seq);
    pairs.set(l.allocation.pair, p);
  }
  if (!pairs.size) return <p className="text-ink-soft">No pair confirmed from this flitch yet.</p>;
  return (
    <ul className="flex flex-col gap-2" data-testid="flitch-pairs">
      {[...pairs].map(([pair, p]) => (
        <li key={pair}>
          <SerialLink identity={pair} />: face {leafList(p.face)}
          {p.reserve.length ? ` · reserve ${leafList(p.reserve)}` : ""}
        </li>
      ))}
    </ul>
  );
}
