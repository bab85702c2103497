/**
 * What a matching plan means for the person about to accept it, in the lab's words. Pure: the
 * match page, the batch page and the lab's home page all say it the same way.
 */
import { formatLimitDb } from "@/lib/acoustics/format";
import type { PairPlan } from "@/lib/matching";

/** A difference that is over the limit, with enough decimals that it does not read as the limit (1.004 over 1.0 is "1.004 dB"). */
function overLimit(diffDb: number, limitDb: number): string {
  for (let d = 2; d <= 6; d++) {
    const s = diffDb.toFixed(d);
    if (Number(s) > limitDb) return `${s} dB`;
  }
  return `${String(diffDb)} dB`;
}

/**
 * Why a plan pairs nothing, or null when it pairs at least one: "No two of the 2 measured units are
 * within the 1.0 dB limit: the closest two, D-TW-… and D-TW-…, differ by 1.43 dB at 2 kHz."
 * `noun` is the plural ("units", "boards"); `bandLabels` name the bands the levels are in ("2 kHz").
 */
export function whyNoPairs(plan: PairPlan, o: { free: number; limitDb: number; noun: string; bandLabels: readonly string[] }): string | null {
  if (plan.pairs.length > 0) return null;
  if (o.free === 0) return `No measured ${o.noun} are free to pair.`;
  if (o.free === 1) return `Only 1 measured ${o.noun.replace(/s$/, "")} is free: a pair takes two.`;
  const closest = plan.single
    .filter((s) => s.closest)
    .map((s) => ({ a: s.id, ...s.closest! }))
    .sort((x, y) => x.maxDiffDb - y.maxDiffDb)[0];
  const within = `No two of the ${o.free} measured ${o.noun} are within the ${formatLimitDb(o.limitDb)} limit`;
  if (!closest) return `${within}.`;
  const band = o.bandLabels[closest.worstBand] ?? `band ${closest.worstBand + 1}`;
  return `${within}: the closest two, ${closest.a} and ${closest.id}, differ by ${overLimit(closest.maxDiffDb, o.limitDb)} at ${band}.`;
}
