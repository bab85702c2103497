/**
 * Metal trim parts of the demo: for every built pair of a model with trim positions, a delivery
 * received three days before its assembly (one supplier's lot a month, found again by its code),
 * each part walked along the model's trim route with `recordStep`, and its serial left for the
 * build to scan. Two more deliveries the demo opens with: one finished and waiting for assembly,
 * one part-way along its route.
 */
import { defaultTrimRoute } from "@/lib/route/default-spec";
import { recordStep } from "@/lib/route/pair-route";
import { receiveTrimParts } from "@/lib/trim/receive";
import { SIDES } from "@/lib/vocabulary/sides";
import { DAY, HOUR, MIN, plus, workday, yymm } from "./basics";
import type { Ctx, PairPlan, Plan } from "./plan";
import type { RefModel } from "./reference";

/** The invented supplier of the demo's machined trim. */
const SUPPLIER = "Coldharbour Metalworks";

/** When each trim step starts after the parts are received: the 24 h cure after the last coat is respected. */
function trimSchedule(received: Date): { seq: number; start: Date }[] {
  const offsets: Record<string, number> = {
    "trim-sanding": HOUR,
    "trim-check-sanding": 2 * HOUR,
    "trim-paint-1": 3 * HOUR,
    "trim-paint-2": 5 * HOUR,
    "trim-paint-3": 7 * HOUR,
    "trim-film": 33 * HOUR,
    "trim-polish": 34 * HOUR,
    "trim-inspection": 35 * HOUR,
  };
  return defaultTrimRoute().map((s) => {
    const at = offsets[s.key];
    if (at === undefined) throw new Error(`history seed: no time planned for trim step ${s.key}`);
    return { seq: s.seq, start: plus(received, at) };
  });
}

/** Readings inside their windows: checks passed, the coat number, a film of 85 µm. */
function trimReadings(seq: number): Record<string, string | boolean> {
  const step = defaultTrimRoute().find((s) => s.seq === seq)!;
  return Object.fromEntries(step.readings.map((r) => [r.key, r.kind === "check" ? true : r.equals !== undefined ? String(r.equals) : "85"]));
}

/**
 * Receives `count` parts at each of the model's trim positions and walks them along the route up to
 * step `upTo` (all of it when left out). The serials are kept in ctx.notes under `${key}:${i}:${slot}`.
 */
function planTrimParts(plan: Plan, key: string, model: RefModel, received: Date, count: number, upTo?: number): void {
  const positions = [...new Set(model.trim.map((t) => t.position))];
  const perPosition = (position: string) => model.trim.filter((t) => t.position === position).length * count;
  plan.add(received, `receiving trim parts for ${key}`, async (ctx) => {
    for (const position of positions) {
      const { parts } = await receiveTrimParts(ctx.db, { modelId: model.id, position, supplier: SUPPLIER, lotCode: `CM-${model.code}-${position}-${yymm(received)}`, count: perPosition(position) }, ctx.ref.actors.cabinet);
      parts.forEach((part, i) => ctx.items.set(`${key}:trim:${position}:${i}`, part));
    }
  });
  for (const step of trimSchedule(received)) {
    if (upTo !== undefined && step.seq > upTo) break;
    plan.add(plus(step.start, 20 * MIN), `trim step ${step.seq} of ${key}`, async (ctx: Ctx) => {
      for (const position of positions) {
        for (let i = 0; i < perPosition(position); i++) {
          const part = ctx.items.get(`${key}:trim:${position}:${i}`)!;
          await recordStep(ctx.db, { pairId: part.id, seq: step.seq, sides: ["L"], startedAt: step.start, readings: trimReadings(step.seq) }, ctx.ref.actors.cabinet);
        }
      }
    });
  }
}

/** The trim a pair's build scans: received three days before, finished the day after. */
export function planPairTrim(plan: Plan, p: PairPlan): void {
  if (!p.model.trim.length) return;
  planTrimParts(plan, p.key, p.model, plus(p.t.assembly, -3 * DAY), 2);
}

/** The scans of a pair's trim parts: the parts received for it, left speaker first. */
export function trimScans(ctx: Ctx, p: PairPlan): { side: "L" | "R"; slot: string; code: string }[] {
  const next = new Map<string, number>();
  return SIDES.flatMap((side) =>
    p.model.trim.map((t) => {
      const i = next.get(t.position) ?? 0;
      next.set(t.position, i + 1);
      return { side, slot: t.slot, code: ctx.items.get(`${p.key}:trim:${t.position}:${i}`)!.identity };
    }),
  );
}

/** Trim parts in the shop when the demo opens: a pair's worth finished, and a pair's worth between coats. */
export function planTrimToday(plan: Plan, models: RefModel[], now: Date): void {
  const model = models.find((m) => m.trim.length);
  if (!model) return;
  planTrimParts(plan, "trim:ready", model, workday(now, -4, 8), 2);
  planTrimParts(plan, "trim:painting", model, workday(now, -1, 8), 2, 4);
}
