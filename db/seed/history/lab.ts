/**
 * The lab's drive units: a batch of each part type comes in for each month's assemblies and is
 * registered (`registerBatch`), measured from the bench's files (`importResponseFiles`,
 * `importTsRows`), a unit now and then failed on the bench (`failUnit`), and matched for the
 * models that month's pairs are (`matchBatch`, `acceptPlan`). Units no partner suits stay in
 * stock, as in a real shop. When the demo opens, a tweeter batch is measured and ready to match
 * and a bass batch waits for the bench.
 */
import { acceptPlan, failUnit, importResponseFiles, importTsRows, matchBatch, registerBatch } from "@/lib/lab/units";
import type { PartType } from "@/lib/vocabulary/part-types";
import { HOUR, MIN, plus, utcDay, workday, type Rng } from "./basics";
import { responseFile, unitMeasurement, type UnitMeasurement } from "./measurements";
import { setQueue, type Ctx, type PairPlan, type Plan } from "./plan";
import type { RefModel } from "./reference";

// Invented makers and part numbers.
const MAKERS: Record<PartType, { maker: string; prefix: string; partNumber: string }> = {
  tweeter: { maker: "Corvane Acoustique", prefix: "CV", partNumber: "DT-25N" },
  midrange: { maker: "Varnholt Elektroakustik", prefix: "VH", partNumber: "M13-PX" },
  bass: { maker: "Varnholt Elektroakustik", prefix: "VH", partNumber: "W18-PX" },
};
const BENCH_FAULTS: Record<PartType, string> = {
  tweeter: "Rub on the sweep at 4 kHz",
  midrange: "Voice coil rubs at full excursion",
  bass: "Rub and buzz at 40 Hz",
};

/** The makers' own running numbers: units reach the lab sorted by the maker's measurements, so they have gaps. */
export class MakerSerials {
  private next: Record<string, number> = { CV: 418_230, VH: 2_207_514 };
  take(rng: Rng, prefix: string): string {
    this.next[prefix] = (this.next[prefix] ?? 100_000) + rng.int(1, 9);
    return `${prefix}${this.next[prefix]}`;
  }
}

interface BatchPlan {
  key: string;
  partType: PartType;
  received: Date;
  /** When the files are imported; null: the batch still waits for the bench. */
  measured: Date | null;
  makerSerials: string[];
  lot: string;
  units: (UnitMeasurement | null)[];
  /** Index of a unit that failed on the bench, if any. */
  failed: number | null;
}

function planBatch(plan: Plan, b: BatchPlan): void {
  const m = MAKERS[b.partType];
  plan.add(b.received, `registering ${b.key}`, async (ctx) => {
    const made = await registerBatch(
      ctx.db,
      { partType: b.partType, partNumber: m.partNumber, maker: m.maker, lot: b.lot, receivedOn: utcDay(b.received), makerSerials: b.makerSerials, count: b.makerSerials.length },
      ctx.ref.actors.lab,
    );
    ctx.batches.set(b.key, { id: made.id, code: made.code, units: made.units });
  });
  if (!b.measured) return;
  const batchOf = (ctx: Ctx) => ctx.batches.get(b.key)!;
  if (b.failed !== null) {
    plan.add(plus(b.measured, -10 * MIN), `a unit of ${b.key} failing on the bench`, async (ctx) => {
      await failUnit(ctx.db, { itemId: batchOf(ctx).units[b.failed!]!.id, reason: BENCH_FAULTS[b.partType] }, ctx.ref.actors.lab);
    });
  }
  plan.add(b.measured, `measuring ${b.key}`, async (ctx) => {
    const batch = batchOf(ctx);
    const files = batch.units.flatMap((u, i) => (b.units[i] ? [{ name: `${u.identity}.txt`, text: responseFile(`${u.identity} (${b.makerSerials[i]})`, b.units[i]!.points) }] : []));
    await importResponseFiles(ctx.db, files, { batchId: batch.id, source: "upload" }, ctx.ref.actors.lab);
  });
  plan.add(plus(b.measured, 30 * MIN), `Thiele–Small parameters of ${b.key}`, async (ctx) => {
    const batch = batchOf(ctx);
    const rows = batch.units.flatMap((u, i) => (b.units[i] ? [{ line: csvLine(i), serial: u.identity, ts: b.units[i]!.ts }] : []));
    await importTsRows(ctx.db, rows, { batchId: batch.id, source: "csv" }, ctx.ref.actors.lab);
  });
}
/** The CSV line of the i-th unit (the header is line 1). */
const csvLine = (i: number) => i + 2;

function batchPlan(rng: Rng, serials: MakerSerials, key: string, partType: PartType, received: Date, measured: Date | null, count: number, failChance: number): BatchPlan {
  const m = MAKERS[partType];
  const makerSerials = Array.from({ length: count }, () => serials.take(rng, m.prefix));
  const failed = measured && rng.chance(failChance) ? rng.int(0, count - 1) : null;
  const units = makerSerials.map((_, i) => (measured && i !== failed ? unitMeasurement(rng, partType) : null));
  return { key, partType, received, measured, makerSerials, lot: `${m.prefix}-${rng.int(2400, 2999)}`, units, failed };
}

/**
 * One batch of each part type for each calendar month's assemblies, received nine to fourteen
 * days before the first of them, measured the next working day and matched that afternoon for
 * each model, as many sets as the month's pairs need (a spare fifth or at least two units more).
 */
export function planUnitBatches(plan: Plan, rng: Rng, serials: MakerSerials, pairs: PairPlan[], now: Date): void {
  const months = new Map<string, PairPlan[]>();
  for (const p of [...pairs].sort((a, b) => a.t.assembly.getTime() - b.t.assembly.getTime())) {
    const key = p.t.assembly.toISOString().slice(0, 7);
    months.set(key, [...(months.get(key) ?? []), p]);
  }
  for (const [month, group] of months) {
    const received = workday(group[0]!.t.assembly, -rng.int(9, 14), 9);
    if (received > now) continue;
    const measured = workday(received, 1, 10);
    const needs = new Map<PartType, Map<RefModel, number>>();
    for (const p of group) {
      for (const { partType } of p.model.positions) {
        const byModel = needs.get(partType) ?? new Map<RefModel, number>();
        byModel.set(p.model, (byModel.get(p.model) ?? 0) + 1);
        needs.set(partType, byModel);
      }
    }
    let n = 0;
    for (const [partType, byModel] of needs) {
      const sets = [...byModel.values()].reduce((a, b) => a + b, 0);
      const key = `batch:${month}:${partType}`;
      const b = batchPlan(rng, serials, key, partType, plus(received, n * 15 * MIN), plus(measured, n++ * HOUR), 2 * sets + Math.max(2, Math.ceil(0.4 * sets)), 0.08);
      planBatch(plan, b);
      // One plan for the batch, its pairs handed out model by model (each accepted against that model's own limit).
      const matched = plus(b.measured!, 3 * HOUR);
      const wanted = [...byModel].sort(([a], [b]) => a.code.localeCompare(b.code));
      plan.add(matched, `matching ${key}`, async (ctx) => {
        const batch = ctx.batches.get(key)!;
        const limitDb = Math.min(...wanted.map(([m]) => m.limits[partType]!));
        const pairs = (await matchBatch(ctx.db, { id: batch.id, partType }, { limitDb })).plan.pairs;
        if (pairs.length < sets) throw new Error(`history seed: ${batch.code} gave ${pairs.length} ${partType} sets, ${sets} needed`);
        for (const [model, count] of wanted) {
          const chosen = pairs.splice(0, count);
          const made = await acceptPlan(ctx.db, { batchId: batch.id, modelId: model.id, pairs: chosen.map((c) => ({ a: c.a, b: c.b })) }, ctx.ref.actors.lab);
          setQueue(ctx, `${model.code}:${partType}`).push(...made);
        }
      });
    }
  }
}

/** The lab when the demo opens: tweeters measured three days ago and ready to match; bass units in since yesterday. */
export function planLabToday(plan: Plan, rng: Rng, serials: MakerSerials, now: Date): void {
  const tweetersIn = workday(now, -4, 9);
  planBatch(plan, batchPlan(rng, serials, "batch:today:tweeter", "tweeter", tweetersIn, plus(tweetersIn, 2 * HOUR), 12, 0));
  planBatch(plan, batchPlan(rng, serials, "batch:today:bass", "bass", workday(now, -1, 9), null, 8, 0));
}
