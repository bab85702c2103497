/**
 * What the service desk may fit at a failed position, worked out against the unit that survives
 * in the partner speaker. Pure (no server import): the page, the JSON route and the tests share it.
 *
 * The cost is the lab's own (lib/matching, PRODUCT.md "What it computes" §3 and §5): the RMS of the
 * band-level differences over the part type's passband, plus weighted relative differences of Fs
 * and Qts where both are measured; a unit whose largest band difference from the survivor exceeds
 * the model's limit is not offered.
 */
import { formatDb, formatLimitDb } from "@/lib/acoustics/format";
import { pairCost, planPairs, rankReplacements, type MatchOptions, type PlannedPair, type Unit } from "@/lib/matching";

export interface RankedCandidate {
  id: string;
  cost: number;
  maxDiffDb: number;
  /** The band of the largest difference from the survivor (an index into the levels). */
  worstBand: number;
}

export interface ReplacementPlan {
  /** Stock units within the limit of the survivor, best (least cost) first. */
  candidates: RankedCandidate[];
  /**
   * When no single unit fits: pairs from stock to replace both units at the position, best first.
   * They are the pairs of the lab's optimal plan for the stock (`planPairs`), so taking one leaves
   * the rest of the stock as well paired as before. Empty when a single unit fits.
   */
  sets: PlannedPair[];
  /** The stock unit nearest the survivor by its largest band difference, when none is within the limit. */
  closest: { id: string; maxDiffDb: number; worstBand: number } | null;
  /** Why both units must be replaced (or why nothing can be), in the desk's words; null when a unit fits. */
  why: string | null;
}

/**
 * Ranks `stock` against `survivor` within `opts.limitDb` (lib/matching `rankReplacements`) and,
 * when nothing fits, plans pairs from the stock instead. `name` says how people call the survivor
 * and the noun for the stock ("units", "boards") in the reason.
 */
export function planReplacement(survivor: Unit, stock: Unit[], opts: MatchOptions, words: { survivor: string; noun: string } = { survivor: survivor.id, noun: "units" }): ReplacementPlan {
  const ranked = rankReplacements(survivor, stock, opts);
  const candidates = ranked.map((r) => ({ ...r, worstBand: pairCost(survivor, stock.find((u) => u.id === r.id)!, opts).worstBand }));
  if (candidates.length) return { candidates, sets: [], closest: null, why: null };

  let closest: ReplacementPlan["closest"] = null;
  for (const u of stock) {
    const c = pairCost(survivor, u, opts);
    if (!closest || c.maxDiffDb < closest.maxDiffDb) closest = { id: u.id, maxDiffDb: c.maxDiffDb, worstBand: c.worstBand };
  }
  const sets = stock.length >= 2 ? planPairs(stock, opts).pairs : [];
  const band = (i: number) => opts.bandLabels?.[i] ?? `band ${i + 1}`;
  const nothing = stock.length === 0 ? `There are no measured ${words.noun} in stock to match ${words.survivor}.` : `No ${words.noun.replace(/s$/, "")} in stock is within the ${formatLimitDb(opts.limitDb)} limit of ${words.survivor}: the closest, ${closest!.id}, differs by ${formatDb(closest!.maxDiffDb)} at ${band(closest!.worstBand)}.`;
  const why = sets.length
    ? `${nothing} Replace both ${words.noun} at this position with a matched pair from stock instead; the partner speaker has to come in too.`
    : `${nothing} No two ${words.noun} in stock match each other within the limit either: order new ${words.noun} and wait for the part.`;
  return { candidates, sets, closest, why };
}
