import type { Metadata } from "next";
import { and, eq } from "drizzle-orm";
import { BackLink } from "@/components/ui/back-link";
import { buttonClasses } from "@/components/ui/button";
import { DataTable } from "@/components/ui/data-table";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { PairChart } from "@/components/lab/pair-chart";
import { getDb } from "@/db";
import { modelTolerances, models } from "@/db/schema";
import { requirePage } from "@/lib/auth/guard";
import { batchByCode, batchUnitsView, listBatches, matchBatch, PASSBANDS } from "@/lib/lab/units";
import { AcceptPlan } from "./accept-plan";

export const metadata: Metadata = { title: "Match left and right" };

const db2 = (n: number) => n.toFixed(2);

export default async function MatchPage({ searchParams }: { searchParams: Promise<{ batch?: string; model?: string; fs?: string; qts?: string; accepted?: string }> }) {
  await requirePage("lab.work");
  const db = getDb();
  const sp = await searchParams;
  const batches = (await listBatches(db)).filter((b) => b.ready >= 2 || b.code === sp.batch);
  const batch = sp.batch ? await batchByCode(db, sp.batch) : batches[0] ? await batchByCode(db, batches[0].code) : null;
  const modelsFor = batch
    ? await db
        .select({ id: models.id, code: models.code, name: models.name, limit: modelTolerances.mismatchLimitDb })
        .from(modelTolerances)
        .innerJoin(models, eq(models.id, modelTolerances.modelId))
        .where(and(eq(modelTolerances.partType, batch.partType), eq(models.active, true)))
    : [];
  const model = modelsFor.find((m) => m.code === sp.model) ?? modelsFor[0];
  const weight = (v: string | undefined) => {
    const n = Number(v ?? "0");
    return Number.isFinite(n) && n >= 0 && n <= 10 ? n : 0;
  };
  const fsWeight = weight(sp.fs);
  const qtsWeight = weight(sp.qts);
  const view = batch && model ? await matchBatch(db, { id: batch.id, partType: batch.partType }, { limitDb: model.limit, fsWeight, qtsWeight }) : null;
  const points = batch && view ? new Map((await batchUnitsView(db, batch.id, { withPoints: true })).map((u) => [u.identity, u.points])) : new Map();
  const byId = new Map(view?.units.map((u) => [u.id, u]) ?? []);
  const pass = batch ? PASSBANDS[batch.partType] : null;
  const gain = view ? view.plan.greedyTotalCost - view.plan.totalCost : 0;

  return (
    <div className="flex flex-col gap-6" data-testid="match-page">
      <BackLink href="/lab">Lab</BackLink>
      <PageHeader title="Match left and right" lead="The plan pairs as many measured units as the limit allows and, among those plans, the closest overall: the sum of each pair's RMS band difference is the least possible." />
      <Panel>
        <form method="get" className="flex flex-wrap items-end gap-4" data-testid="match-controls">
          <label className="flex flex-col gap-1">
            <span className="font-bold">Batch</span>
            <select name="batch" defaultValue={batch?.code} className="h-12 rounded-md border border-line-strong bg-surface px-3">
              {batches.map((b) => (
                <option key={b.id} value={b.code}>
                  {b.code}: {b.partType}, {b.partNumber} ({b.ready} ready)
                </option>
              ))}
            </select>
          </label>
          <label className="flex flex-col gap-1">
            <span className="font-bold">For model (its limit)</span>
            <select name="model" defaultValue={model?.code} className="h-12 rounded-md border border-line-strong bg-surface px-3">
              {modelsFor.map((m) => (
                <option key={m.id} value={m.code}>
                  {m.code} {m.name}: {m.limit} dB
                </option>
              ))}
            </select>
          </label>
          <label className="flex flex-col gap-1">
            <span className="font-bold">Weight of Fs</span>
            <input name="fs" type="number" step="0.1" min={0} max={10} defaultValue={fsWeight} className="h-12 w-28 rounded-md border border-line-strong bg-surface px-3" />
          </label>
          <label className="flex flex-col gap-1">
            <span className="font-bold">Weight of Qts</span>
            <input name="qts" type="number" step="0.1" min={0} max={10} defaultValue={qtsWeight} className="h-12 w-28 rounded-md border border-line-strong bg-surface px-3" />
          </label>
          <button type="submit" className={buttonClasses("secondary")}>
            Work out the plan
          </button>
        </form>
        <p className="mt-3 text-sm text-ink-soft">A weight adds weight × |ΔFs| / mean Fs (or the same for Qts) to a pair's cost, where both units have the parameter.</p>
      </Panel>

      {sp.accepted ? (
        <Notice tone="leaf" testId="plan-accepted">
          {`${sp.accepted.split(",").length} matched set${sp.accepted.split(",").length === 1 ? "" : "s"} reserved: ${sp.accepted.split(",").join(", ")}. They wait for assembly on the lab's home page.`}
        </Notice>
      ) : null}
      {!batch ? <Notice tone="info">No batch has two measured units free to match yet.</Notice> : null}
      {batch && !model ? <Notice tone="caution">No model has a mismatch limit for {batch.partType} units.</Notice> : null}

      {view && batch && model && pass ? (
        <>
          <Panel title="The plan">
            <div className="mb-4 grid gap-3 sm:grid-cols-4" data-testid="plan-summary">
              <Figure label="Units measured and free" value={String(view.units.length)} />
              <Figure label="Pairs" value={String(view.plan.pairs.length)} note={`greedy pairing: ${view.plan.greedyPairs}`} />
              <Figure label="Total cost (dB RMS)" value={db2(view.plan.totalCost)} note={`greedy: ${db2(view.plan.greedyTotalCost)}`} />
              <Figure label="Gain over greedy" value={view.plan.pairs.length > view.plan.greedyPairs ? `+${view.plan.pairs.length - view.plan.greedyPairs} pair${view.plan.pairs.length - view.plan.greedyPairs === 1 ? "" : "s"}` : `${db2(gain)} dB`} />
            </div>
            <DataTable
              caption="Pairs of the plan"
              testId="plan-pairs"
              empty="No two units are within the limit."
              initialSort={{ key: "cost", dir: "asc" }}
              columns={[
                { key: "n", label: "#", numeric: true },
                { key: "a", label: "Left" },
                { key: "b", label: "Right" },
                { key: "cost", label: "Cost, dB RMS", numeric: true },
                { key: "max", label: "Largest difference, dB", numeric: true },
              ]}
              rows={view.plan.pairs.map((p, i) => ({
                id: `${p.a}:${p.b}`,
                cells: {
                  n: { value: i + 1 },
                  a: { value: byId.get(p.a)?.identity ?? p.a, display: <span className="serial">{byId.get(p.a)?.identity}</span> },
                  b: { value: byId.get(p.b)?.identity ?? p.b, display: <span className="serial">{byId.get(p.b)?.identity}</span> },
                  cost: { value: p.cost, display: db2(p.cost) },
                  max: { value: p.maxDiffDb, display: `${db2(p.maxDiffDb)} of ${model.limit}` },
                },
              }))}
            />
            {view.plan.single.length || view.notReady.length ? (
              <div className="mt-4" data-testid="plan-single">
                <h3 className="mb-1 font-bold">Left single</h3>
                <ul className="list-disc pl-5">
                  {view.plan.single.map((s) => (
                    <li key={s.id}>
                      <span className="serial">{byId.get(s.id)?.identity}</span>: {s.reason}
                    </li>
                  ))}
                  {view.notReady.map((s) => (
                    <li key={s.identity}>
                      <span className="serial">{s.identity}</span>: {s.reason}
                    </li>
                  ))}
                </ul>
              </div>
            ) : null}
            {view.plan.pairs.length ? (
              <div className="mt-6">
                <AcceptPlan batch={batch.code} batchId={batch.id} modelId={model.id} fsWeight={fsWeight} qtsWeight={qtsWeight} pairs={view.plan.pairs.map((p) => `${p.a}:${p.b}`).join(";")} count={view.plan.pairs.length} />
              </div>
            ) : null}
          </Panel>
          {view.plan.pairs.length ? (
            <Panel title="Each pair's responses">
              <div className="grid gap-4 lg:grid-cols-2">
                {view.plan.pairs.map((p, i) => {
                  const A = byId.get(p.a)!;
                  const B = byId.get(p.b)!;
                  const bands = view.bands.map((band, k) => {
                    const mean = (A.levels[k]! + B.levels[k]!) / 2;
                    return { centreHz: band.centreHz, nominal: band.nominal, low: mean - model.limit / 2, high: mean + model.limit / 2 };
                  });
                  return (
                    <PairChart
                      key={`${p.a}:${p.b}`}
                      title={`Pair ${i + 1}: ${db2(p.cost)} dB RMS, largest ${db2(p.maxDiffDb)} dB`}
                      a={{ label: A.identity, points: (points.get(p.a) ?? []).map((x: number[]) => [x[0]!, x[1]!] as [number, number]) }}
                      b={{ label: B.identity, points: (points.get(p.b) ?? []).map((x: number[]) => [x[0]!, x[1]!] as [number, number]) }}
                      bands={bands}
                      limitDb={model.limit}
                      minHz={pass.minHz}
                      maxHz={pass.maxHz}
                    />
                  );
                })}
              </div>
            </Panel>
          ) : null}
        </>
      ) : null}
    </div>
  );
}

function Figure({ label, value, note }: { label: string; value: string; note?: string }) {
  return (
    <div className="rounded-lg border border-line bg-paper p-3">
      <p className="text-sm text-ink-soft">{label}</p>
      <p className="text-2xl font-bold tabular-nums">{value}</p>
      {note ? <p className="text-sm text-ink-soft">{note}</p> : null}
    </div>
  );
}
