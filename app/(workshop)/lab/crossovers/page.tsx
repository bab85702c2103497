import type { Metadata } from "next";
import { MatchPlan } from "@/components/lab/match-plan";
import { LeftOutNote } from "@/components/register/containment-hold";
import { ResponseUpload } from "@/components/lab/response-upload";
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
import { formatHzRange, formatLimitDb } from "@/lib/acoustics";
import { formatWhen } from "@/lib/format";
import { stateLabel } from "@/lib/vocabulary/item-kinds";
import { crossoverBoards, crossoverModels, lotsInStock, matchCrossovers, type CrossoverMatchView } from "@/lib/lab/crossovers";
import { AcceptCrossovers } from "./accept-crossovers";
import { BuildForm } from "./build-form";
import { limitSchema } from "./schemas";

export const metadata: Metadata = { title: "Crossover boards" };

const BOARDS_SHOWN = 30;
const TONE: Record<string, "info" | "leaf" | "walnut" | "danger" | "neutral"> = { in_stock: "info", reserved: "leaf", failed: "danger", fitted: "walnut" };

export default async function CrossoversPage({ searchParams }: { searchParams: Promise<{ model?: string; limit?: string }> }) {
  await requirePage("lab.work");
  const db = getDb();
  const sp = await searchParams;
  const [models, lots, boards] = await Promise.all([crossoverModels(db), lotsInStock(db), crossoverBoards(db, { limit: BOARDS_SHOWN })]);

  const model = models.find((m) => m.code === sp.model) ?? models[0] ?? null;
  // Boards that passed their check but were built without a response: measured here, then paired.
  const unmeasured = boards.filter((b) => b.state === "in_stock" && !b.hasResponse);
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

      <Panel title="Measure boards built without a response">
        <p className="mb-3 text-ink-soft">
          A board is paired on its measured response, and assembly fits only boards paired in a set. Bring in the response of each board in stock that has none: one file per board, its serial in the first line or the file name.
        </p>
        {unmeasured.length ? (
          <p className="mb-4" data-testid="boards-unmeasured">
            Waiting for a response:{" "}
            {unmeasured.map((b, i) => (
              <span key={b.id}>
                {i ? ", " : ""}
                <SerialLink identity={b.identity} bold={false} />
              </span>
            ))}
            .
          </p>
        ) : (
          <p className="mb-4 text-sm text-ink-soft">Every board in stock among the newest {BOARDS_SHOWN} has its response.</p>
        )}
        <ResponseUpload noun="board" />
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
          {model ? ` (${formatHzRange(model.responseMinHz, model.responseMaxHz)})` : ""}. The limit starts at the model&apos;s tightest drive-unit limit and may not exceed its finished-pair limit
          {model ? ` of ${formatLimitDb(model.pairResponseLimitDb)}` : ""}.
        </p>
        {limitProblem ? (
          <Notice tone="caution" className="mt-3">
            {limitProblem}
          </Notice>
        ) : null}

        {view && model ? (
          <div className="mt-6">
            <LeftOutNote quarantined={view.quarantined} one="board" many="boards" className="mb-4" />
            <MatchPlan
              plan={view.plan}
              units={view.units}
              notReady={view.notReady}
              bands={view.bands}
              limitDb={limitDb}
              minHz={model.responseMinHz}
              maxHz={model.responseMaxHz}
              freeLabel="Boards ready and free"
              noun="boards"
              testPrefix="crossover-"
              // Always mounted, so its answer stays on screen after the page is worked out again.
              accept={<AcceptCrossovers modelId={model.id} limitDb={limitDb} pairs={view.plan.pairs.map((p) => `${p.a}:${p.b}`).join(";")} count={view.plan.pairs.length} />}
            />
          </div>
        ) : null}
      </Panel>
    </div>
  );
}

