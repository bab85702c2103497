/**
 * The cabinet route of every pair (and of every lacquer cabinet, which travels alone until
 * assembly pairs it), recorded step by step with `recordStep` at plausible times after the press,
 * holds respected. Two nonconformances tell their story through `recordStep` and `dispositionNc`.
 */
import { correctRecord } from "@/lib/route/corrections";
import { dispositionNc, openNonconformances } from "@/lib/route/nonconformances";
import { OutOfWindowUnconfirmed, recordStep } from "@/lib/route/pair-route";
import { defaultRoute } from "@/lib/route/default-spec";
import { P_GRADES } from "@/lib/route/rules";
import type { Side } from "@/lib/vocabulary/sides";
import { DAY, HOUR, MIN, plus, type Rng } from "./basics";
import { got, type Plan } from "./plan";

export interface ScheduledStep {
  seq: number;
  key: string;
  start: Date;
  recorded: Date;
}

/**
 * When each step of the workshop's usual route starts and is recorded, from the press: trimming
 * and bracing the same day, sanding and its check the next, four coats, flatting and four more
 * coats over the next two days, then the two weeks' cure after the last coat before polishing.
 */
export function routeSchedule(press: Date): ScheduledStep[] {
  const polish = new Date(press.getTime() + 18 * DAY);
  polish.setUTCHours(9, 0, 0, 0);
  const startOf = (key: string): Date => {
    if (key.startsWith("coat-")) {
      const n = Number(key.slice(5));
      return plus(press, n <= 4 ? 2 * DAY + (n - 1) * 2 * HOUR : 3 * DAY + 2 * HOUR + (n - 5) * 2 * HOUR);
    }
    const offsets: Record<string, number> = { press: 0, trim: 2 * HOUR, brace: 3 * HOUR, sanding: DAY, "check-sanding": DAY + HOUR, flatting: 3 * DAY };
    if (key in offsets) return plus(press, offsets[key]!);
    const afterCure: Record<string, number> = { "machine-polish": 0, "check-polish": 2 * HOUR, "hand-finish": 4 * HOUR };
    if (key in afterCure) return plus(polish, afterCure[key]!);
    throw new Error(`history seed: no time planned for route step ${key}`);
  };
  return defaultRoute().map((s) => {
    const start = startOf(s.key);
    // Braces are recorded when the clamps come off; the polishing cycle when the machine stops.
    const took = s.key === "brace" ? 2 * HOUR + 10 * MIN : s.key === "machine-polish" ? 75 * MIN : 25 * MIN;
    return { seq: s.seq, key: s.key, start, recorded: plus(start, took) };
  });
}

/** Readings typed at a step, inside their windows (the demo workshop's usual values). */
function readingsFor(rng: Rng, key: string, press: Date): Record<string, string | boolean> {
  const step = defaultRoute().find((s) => s.key === key)!;
  const out: Record<string, string | boolean> = {};
  for (const r of step.readings) {
    if (r.kind === "check") out[r.key] = true;
    // The lacquer maker's lot: the invented workshop opens a new drum each month, build and top coats apart.
    else if (r.kind === "text") out[r.key] = lacquerLot(press, key);
    else if (r.kind === "grit") {
      const grades = P_GRADES.filter((g) => (r.min === undefined || g >= r.min) && (r.max === undefined || g <= r.max));
      out[r.key] = `P${grades[rng.int(0, grades.length - 1)]}`;
    }
    else if (r.equals !== undefined) out[r.key] = String(r.equals);
    else if (r.absMax !== undefined) out[r.key] = (rng.int(-15, 15) / 100).toFixed(2);
    else if (r.min !== undefined && r.max !== undefined) out[r.key] = String(r.min + rng.int(0, r.max - r.min));
    else out[r.key] = String((r.min ?? 0) + rng.int(5, 15));
  }
  return out;
}

/** "GL-2611-B": an invented lacquer lot, by the month of the press and build (B) or top (T) coats. */
export function lacquerLot(press: Date, key: string): string {
  const n = Number(key.replace(/^coat-/, ""));
  const yymm = `${String(press.getUTCFullYear() % 100).padStart(2, "0")}${String(press.getUTCMonth() + 1).padStart(2, "0")}`;
  return `GL-${yymm}-${n <= 4 ? "B" : "T"}`;
}

export interface RouteSubject {
  /** The key of the pair, or of the lone lacquer cabinet. */
  key: string;
  sides: Side[];
  press: Date;
  /** The open trim nonconformance: the step is recorded out of window and the route stops there. */
  openTrimNc?: boolean;
  /** The polishing cycle over its window, then accepted as it is by quality. */
  polishUsedAsIs?: boolean;
  /** Coat 3's wet film typed 1100 for 110 µm: corrected by the cabinet shop, closed by quality as an entry error. */
  filmSlipCorrected?: boolean;
}

export function planRoute(plan: Plan, rng: Rng, s: RouteSubject): void {
  for (const step of routeSchedule(s.press)) {
    const readings = readingsFor(rng, step.key, s.press);
    if (s.openTrimNc && step.key === "trim") readings.deviationMm = "0.24";
    const slip = s.filmSlipCorrected && step.key === "coat-3";
    if (slip) readings.wetFilmUm = "1100";
    if (s.polishUsedAsIs && step.key === "machine-polish") readings.cycleMinutes = "84";
    // The two planned nonconformances are recorded as a person does: asked once, and confirmed.
    const meantOutOfWindow = (s.openTrimNc && step.key === "trim") || (s.polishUsedAsIs && step.key === "machine-polish") || slip;
    let recordId = 0;
    plan.add(step.recorded, `route step ${step.seq} of ${s.key}`, async (ctx) => {
      const input = { pairId: got(ctx, s.key).id, seq: step.seq, sides: s.sides, startedAt: step.start, readings };
      try {
        recordId = (await recordStep(ctx.db, input, ctx.ref.actors.cabinet)).recordId;
      } catch (e) {
        if (!(meantOutOfWindow && e instanceof OutOfWindowUnconfirmed)) throw e;
        recordId = (await recordStep(ctx.db, { ...input, confirmOutOfWindow: e.confirmation }, ctx.ref.actors.cabinet)).recordId;
      }
    });
    if (slip) {
      // The slip noticed at the oven ten minutes later and corrected; quality signs it off as an entry error.
      plan.add(plus(step.recorded, 10 * MIN), `film reading corrected on ${s.key}`, async (ctx) => {
        await correctRecord(ctx.db, { pairId: got(ctx, s.key).id, recordId, readings: { wetFilmUm: "110" }, reason: "Typed 1100 for 110: the wet film comb read 110 µm." }, { ...ctx.ref.actors.cabinet, mayCorrectAny: false, mayCorrectOwn: true });
      });
      plan.add(plus(step.recorded, 20 * MIN), `entry error closed on ${s.key}`, async (ctx) => {
        const pairId = got(ctx, s.key).id;
        const open = (await openNonconformances(ctx.db)).find((n) => n.nc.pairId === pairId);
        if (!open) throw new Error(`history seed: ${s.key} has no open nonconformance to close as an entry error`);
        await dispositionNc(ctx.db, { ncId: open.nc.id, disposition: "entry_error", reason: "The film was 110 µm, inside its window: 1100 was a typing slip, corrected at the oven." }, ctx.ref.actors.quality);
      });
    }
    if (s.openTrimNc && step.key === "trim") return;
    if (s.polishUsedAsIs && step.key === "machine-polish") {
      plan.add(plus(step.recorded, 30 * MIN), `quality's decision on ${s.key}`, async (ctx) => {
        const pairId = got(ctx, s.key).id;
        const open = (await openNonconformances(ctx.db)).find((n) => n.nc.pairId === pairId);
        if (!open) throw new Error(`history seed: ${s.key} has no open nonconformance to disposition`);
        await dispositionNc(
          ctx.db,
          { ncId: open.nc.id, disposition: "use_as_is", reason: "Finish checked under the inspection lamp: no burn-through, gloss even. The longer cycle did no harm." },
          ctx.ref.actors.quality,
        );
      });
    }
  }
}
