import type { Metadata } from "next";
import { BackLink } from "@/components/ui/back-link";
import { buttonClasses } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { MatchPlan } from "@/components/lab/match-plan";
import { LeftOutNote } from "@/components/register/containment-hold";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { modelsTakingPartType } from "@/lib/lab/queries";
import { batchByCode, listBatches, matchBatch, PASSBANDS } from "@/lib/lab/units";
import { AcceptPlan } from "./accept-plan";
import { formatHzRange, formatLimitDb } from "@/lib/acoustics";
import { partWord } from "@/lib/vocabulary/part-types";

export const metadata: Metadata = { title: "Match left and right" };


export default async function MatchPage({ searchParams }: { searchParams: Promise<{ batch?: string; model?: string; fs?: string; qts?: string; accepted?: string }> }) {
  await requirePage("lab.work");
  const db = getDb();
  const sp = await searchParams;
  const batches = (await listBatches(db)).filter((b) => b.free >= 2 || b.code === sp.batch);
  const batch = sp.batch ? await batchByCode(db, sp.batch) : batches[0] ? await batchByCode(db, batches[0].code) : null;
  const modelsFor = batch ? await modelsTakingPartType(db, batch.partType) : [];
  const model = modelsFor.find((m) => m.code === sp.model) ?? modelsFor[0];
  const weight = (v: string | undefined) => {
    const n = Number(v ?? "0");
    return Number.isFinite(n) && n >= 0 && n <= 10 ? n : 0;
  };
  const fsWeight = weight(sp.fs);
  const qtsWeight = weight(sp.qts);
  const view = batch && model ? await matchBatch(db, { id: batch.id, partType: batch.partType }, { limitDb: model.limit, fsWeight, qtsWeight }) : null;
  const pass = batch ? PASSBANDS[batch.partType] : null;

  return (
    <div className="flex flex-col gap-6" data-testid="match-page">
      <BackLink href="/lab">Lab</BackLink>
      <PageHeader title="Match left and right" lead="The plan pairs as many measured units as the limit allows and, among those plans, the closest overall: the sum of each pair's RMS band difference is the least possible." />
      <Panel>
        <form method="get" className="flex flex-wrap items-end gap-4" data-testid="match-controls">
          <label className="flex min-w-0 max-w-full flex-col gap-1">
            <span className="font-bold">Batch</span>
            <select name="batch" defaultValue={batch?.code} className="h-12 w-full max-w-full rounded-md border border-line-strong bg-surface px-3">
              {batches.map((b) => (
                <option key={b.id} value={b.code}>
                  {b.code}: {partWord(b.partType)}s, {b.partNumber} ({b.free} measured and free)
                </option>
              ))}
            </select>
          </label>
          <label className="flex min-w-0 max-w-full flex-col gap-1">
            <span className="font-bold">For model (its limit)</span>
            <select name="model" defaultValue={model?.code} className="h-12 w-full max-w-full rounded-md border border-line-strong bg-surface px-3">
              {modelsFor.map((m) => (
                <option key={m.id} value={m.code}>
                  {m.code} {m.name}: {formatLimitDb(m.limit)}
                </option>
              ))}
            </select>
          </label>
          <label className="flex min-w-0 max-w-full flex-col gap-1">
            <span className="font-bold">Weight of Fs</span>
            <input name="fs" type="number" step="0.1" min={0} max={10} defaultValue={fsWeight} className="h-12 w-28 rounded-md border border-line-strong bg-surface px-3" />
          </label>
          <label className="flex min-w-0 max-w-full flex-col gap-1">
            <span className="font-bold">Weight of Qts</span>
            <input name="qts" type="number" step="0.1" min={0} max={10} defaultValue={qtsWeight} className="h-12 w-28 rounded-md border border-line-strong bg-surface px-3" />
          </label>
          <button type="submit" className={buttonClasses("secondary")}>
            Work out the plan
          </button>
        </form>
        <p className="mt-3 text-sm text-ink-soft">A weight adds weight × |ΔFs| / mean Fs (or the same for Qts) to a pair’s cost, where both units have the parameter.</p>
      </Panel>

      {sp.accepted ? (
        <Notice tone="leaf" testId="plan-accepted">
          {`${sp.accepted.split(",").length} matched set${sp.accepted.split(",").length === 1 ? "" : "s"} reserved: ${sp.accepted.split(",").join(", ")}. They wait for assembly on the lab's home page.`}
        </Notice>
      ) : null}
      {!batch ? <Notice tone="info">No batch has two measured units free to match yet.</Notice> : null}
      {batch && !model ? <Notice tone="caution">No model has a mismatch limit for {partWord(batch.partType)}s.</Notice> : null}

      {view && batch && model && pass ? (
          <Panel title="The plan">
            <p className="mb-4 text-sm text-ink-soft" data-testid="plan-basis">
              {`${batch.code}'s ${partWord(batch.partType)}s, compared in one-third-octave bands over ${formatHzRange(pass.minHz, pass.maxHz)} (where a ${partWord(batch.partType)} plays in a usual design), against the ${model.code}'s limit of ${formatLimitDb(model.limit)}.`}
            </p>
            <LeftOutNote quarantined={view.quarantined} one="unit" many="units" className="mb-4" />
            <MatchPlan
              plan={view.plan}
              units={view.units}
              notReady={view.notReady}
              bands={view.bands}
              limitDb={model.limit}
              minHz={pass.minHz}
              maxHz={pass.maxHz}
              freeLabel="Units measured and free"
              noun="units"
              accept={
                view.plan.pairs.length ? (
                  <AcceptPlan batch={batch.code} batchId={batch.id} modelId={model.id} fsWeight={fsWeight} qtsWeight={qtsWeight} pairs={view.plan.pairs.map((p) => `${p.a}:${p.b}`).join(";")} count={view.plan.pairs.length} />
                ) : null
              }
            />
          </Panel>
      ) : null}
    </div>
  );
}

