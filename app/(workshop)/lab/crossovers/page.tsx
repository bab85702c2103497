import type { Metadata } from "next";
import { PairChart } from "@/components/lab/pair-chart";
import { SerialLink } from "@/components/register/serial-link";
import { SafetyCautions } from "@/components/shell/safety-cautions";
import { BackLink } from "@/components/ui/back-link";
import { Badge } from "@/components/ui/badge";
import { buttonClasses } from "@/components/ui/button";
import { DataTable } from "@/components/ui/data-table";
import { controlClasses } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { areaByKey } from "@/lib/areas";
import { AppError } from "@/lib/auth/errors";
import { requirePage } from "@/lib/auth/guard";
import { formatWhen } from "@/lib/format";
import { stateLabel } from "@/lib/genealogy/kinds";
import { crossoverBoards, crossoverModels, lotsInStock, matchCrossovers, type CrossoverMatchView } from "@/lib/lab/crossovers";
import { AcceptCrossovers } from "./accept-crossovers";
import { BuildForm } from "./build-form";
import { limitSchema } from "./schemas";

export const metadata: Metadata = { title: "Crossover boards" };

const db2 = (n: number) => n.toFixed(2);
const BOARDS_SHOWN = 30;
const TONE: Record<string, "info" | "leaf" | "walnut" | "danger" | "neutral"> = { in_stock: "info", reserved: "leaf", failed: "danger", fitted: "walnut" };

export default async function CrossoversPage({ searchParams }: { searchParams: Promise<{ model?: string; limit?: string }> }) {
  await requirePage("lab.work");
  const db = getDb();
  const sp = await searchParams;
  const [models, lots, boards] = await Promise.all([crossoverModels(db), lotsInStock(db), crossoverBoards(db, { limit: BOARDS_SHOWN })]);

  const model = models.find((m) => m.code === sp.model) ?? models[0] ?? null;
  let limitDb = model?.defaultLimitDb ?? 0.5;
  let limitProblem: string | null = null;
  if (sp.limit !== undefined && sp.limit !== "") {
    const parsed = limitSchema.safeParse(sp.limit);
    if (parsed.success) limitDb = parsed.data;
    else limitProblem = `${parsed.error.issues[0]?.message ?? "The limit is a number of dB."} Using ${limitDb} dB.`;
  }
  let view: CrossoverMatchView | null = null;
  if (model) {
    try {
      view = await matchCrossovers(db, { modelId: model.id, limitDb });
    } catch (e) {
      if (!(e instanceof AppError)) throw e;
      limitProblem = `${e.message} Using ${model.defaultLimitDb} dB.`;
      limitDb = model.defaultLimitDb;
      view = await matchCrossovers(db, { modelId: model.id, limitDb });
    }
  }
  const byId = new Map(view?.units.map((u) => [u.id, u]) ?? []);
  const gain = view ? view.plan.greedyTotalCost - view.plan.totalCost : 0;

  return (
    <div className="flex flex-col gap-6" data-testid="crossovers-page">
      <BackLink href="/lab">Lab</BackLink>
      <PageHeader
        title="Crossover boards"
        lead="Build each board from its component lots and check every part against its nominal and tolerance; then pair boards left and right on their measured responses."
      />
      <SafetyCautions cautions={areaByKey("lab").cautions} />

      <Panel title="Build a board">
        {models.length ? (
          <BuildForm models={models.map((m) => ({ id: m.id, code: m.code, name: m.name }))} lots={lots} />
        ) : (
          <Notice tone="info">No model is being built, so there is no board to build.</Notice>
        )}
      </Panel>

      <Panel title={`Boards, the newest ${BOARDS_SHOWN}`}>
        <DataTable
          caption="Crossover boards, newest first"
          testId="boards-table"
          empty="No crossover board has been built yet."
          columns={[
            { key: "serial", label: "Serial" },
            { key: "model", label: "Model" },
            { key: "built", label: "Built" },
            { key: "state", label: "State" },
            { key: "verdict", label: "Check" },
            { key: "response", label: "Response" },
            { key: "set", label: "Set" },
          ]}
          rows={boards.map((b) => ({
            id: b.id,
            cells: {
              serial: { value: b.identity, display: <SerialLink identity={b.identity} /> },
              model: { value: b.model ?? "" },
              built: { value: b.createdAt.getTime(), display: formatWhen(b.createdAt) },
              state: { value: b.state, display: <Badge tone={TONE[b.state] ?? "neutral"} className="whitespace-nowrap">{stateLabel(b.state)}</Badge> },
              verdict: {
                value: b.pass === null ? "" : b.pass ? "pass" : "fail",
                display:
                  b.pass === null ? (
                    <span className="text-ink-soft">built before checks were recorded</span>
                  ) : b.pass ? (
                    <span>
                      passed, {b.parts} part{b.parts === 1 ? "" : "s"} within tolerance
                    </span>
                  ) : (
                    <ul className="list-disc pl-4 text-danger" data-testid="board-reasons">
                      {b.reasons.map((r) => (
                        <li key={r}>{r}</li>
                      ))}
                    </ul>
                  ),
              },
              response: { value: b.hasResponse ? 1 : 0, display: b.hasResponse ? "yes" : "no" },
              set: { value: b.setCode ?? "", display: b.setCode ? <span className="serial">{b.setCode}</span> : "" },
            },
          }))}
        />
      </Panel>

      <Panel title="Pair boards">
        <form method="get" className="flex flex-wrap items-end gap-4" data-testid="pair-controls">
          <label className="flex flex-col gap-1">
            <span className="font-bold">Model</span>
            <select name="model" defaultValue={model?.code} className={`${controlClasses} w-64`}>
              {models.map((m) => (
                <option key={m.id} value={m.code}>
                  {m.code} {m.name}
                </option>
              ))}
            </select>
          </label>
          <label className="flex flex-col gap-1">
            <span className="font-bold">Limit, dB</span>
            <input name="limit" type="number" step="0.05" min={0.05} max={model?.pairResponseLimitDb ?? 10} defaultValue={limitDb} className={`${controlClasses} w-28`} />
          </label>
          <button type="submit" className={buttonClasses("secondary")}>
            Work out the plan
          </button>
        </form>
        <p className="mt-3 text-sm text-ink-soft">
          Two boards may pair when their levels differ by no more than the limit in every one-third-octave band over the model&apos;s range
          {model ? ` (${model.responseMinHz}–${model.responseMaxHz} Hz)` : ""}. The limit starts at the model&apos;s tightest drive-unit limit and may not exceed its finished-pair limit
          {model ? ` of ${model.pairResponseLimitDb} dB` : ""}.
        </p>
        {limitProblem ? (
          <Notice tone="caution" className="mt-3">
            {limitProblem}
          </Notice>
        ) : null}

        {view && model ? (
          <div className="mt-6 flex flex-col gap-4">
            <div className="grid gap-3 sm:grid-cols-4" data-testid="crossover-plan-summary">
              <Figure label="Boards ready and free" value={String(view.units.length)} />
              <Figure label="Pairs" value={String(view.plan.pairs.length)} note={`greedy pairing: ${view.plan.greedyPairs}`} />
              <Figure label="Total cost (dB RMS)" value={db2(view.plan.totalCost)} note={`greedy: ${db2(view.plan.greedyTotalCost)}`} />
              <Figure label="Gain over greedy" value={view.plan.pairs.length > view.plan.greedyPairs ? `+${view.plan.pairs.length - view.plan.greedyPairs} pairs` : `${db2(gain)} dB`} />
            </div>
            <DataTable
              caption="Pairs of boards in the plan"
              testId="crossover-plan-pairs"
              empty="No two boards are within the limit."
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
                  a: { value: p.a, display: <span className="serial">{p.a}</span> },
                  b: { value: p.b, display: <span className="serial">{p.b}</span> },
                  cost: { value: p.cost, display: db2(p.cost) },
                  max: { value: p.maxDiffDb, display: `${db2(p.maxDiffDb)} of ${limitDb}` },
                },
              }))}
            />
            {view.plan.single.length || view.notReady.length ? (
              <div data-testid="crossover-plan-single">
                <h3 className="mb-1 font-bold">Left single</h3>
                <ul className="list-disc pl-5">
                  {[...view.plan.single.map((s) => ({ identity: s.id, reason: s.reason })), ...view.notReady].map((s) => (
                    <li key={s.identity}>
                      <span className="serial">{s.identity}</span>: {s.reason}
                    </li>
                  ))}
                </ul>
              </div>
            ) : null}
            {/* Always mounted, so its answer stays on screen after the page is worked out again. */}
            <AcceptCrossovers modelId={model.id} limitDb={limitDb} pairs={view.plan.pairs.map((p) => `${p.a}:${p.b}`).join(";")} count={view.plan.pairs.length} />
            {view.plan.pairs.length ? (
              <>
                <div className="grid gap-4 lg:grid-cols-2">
                  {view.plan.pairs.map((p, i) => {
                    const A = byId.get(p.a)!;
                    const B = byId.get(p.b)!;
                    const bands = view.bands.map((band, k) => {
                      const mean = (A.levels[k]! + B.levels[k]!) / 2;
                      return { centreHz: band.centreHz, nominal: band.nominal, low: mean - limitDb / 2, high: mean + limitDb / 2 };
                    });
                    const pts = (u: typeof A) => u.points.map((x) => [x[0]!, x[1]!] as [number, number]);
                    return (
                      <PairChart
                        key={`${p.a}:${p.b}`}
                        title={`Pair ${i + 1}: ${db2(p.cost)} dB RMS, largest ${db2(p.maxDiffDb)} dB`}
                        a={{ label: A.identity, points: pts(A) }}
                        b={{ label: B.identity, points: pts(B) }}
                        bands={bands}
                        limitDb={limitDb}
                        minHz={model.responseMinHz}
                        maxHz={model.responseMaxHz}
                      />
                    );
                  })}
                </div>
              </>
            ) : null}
          </div>
        ) : null}
      </Panel>
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
