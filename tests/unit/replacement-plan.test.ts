/**
 * The service desk's replacement plan against brute force on random units.
 *
 * The cost formula's source: PRODUCT.md "What it computes" §3 (drive-unit mismatch: RMS of the
 * band-level differences over the passband, plus weighted relative differences of Fs and Qts
 * where measured; a pair whose largest band difference exceeds the model's limit is not allowed)
 * and §5 (replacement matching: stock ranked by mismatch against the survivor, within tolerance
 * only), the same rule as the lab's matching (lib/lab/units.ts matchBatch). The brute force below
 * is written from those definitions, independent of lib/matching.
 */
import { describe, expect, test } from "vitest";
import type { MatchOptions, Unit } from "@/lib/matching";
import { planReplacement } from "@/lib/service/replacement-plan";
import { gaussian, randomInt, seededRandom } from "../fixtures/random";

/** PRODUCT.md §3, written out: RMS of differences + weighted |ΔFs|/mean(Fs) + weighted |ΔQts|/mean(Qts). */
function definedCost(a: Unit, b: Unit, o: MatchOptions) {
  const d = a.levels.map((x, i) => x - b.levels[i]!);
  let cost = Math.sqrt(d.reduce((s, x) => s + x * x, 0) / d.length);
  if (o.fsWeight && a.fs !== undefined && b.fs !== undefined) cost += (o.fsWeight * Math.abs(a.fs - b.fs)) / ((a.fs + b.fs) / 2);
  if (o.qtsWeight && a.qts !== undefined && b.qts !== undefined) cost += (o.qtsWeight * Math.abs(a.qts - b.qts)) / ((a.qts + b.qts) / 2);
  const maxDiffDb = Math.max(...d.map(Math.abs));
  return { cost, maxDiffDb, allowed: maxDiffDb <= o.limitDb + 1e-9 };
}

/** Every matching of the allowed pairs, by recursion: the most pairs, then the least total cost (PRODUCT.md §4). */
function bruteBestMatching(units: Unit[], o: MatchOptions): { pairs: number; total: number } {
  let best = { pairs: 0, total: 0 };
  const walk = (rest: Unit[], pairs: number, total: number) => {
    if (pairs > best.pairs || (pairs === best.pairs && total < best.total - 1e-12)) best = { pairs, total };
    if (rest.length < 2) return;
    const [first, ...others] = rest;
    walk(others, pairs, total); // first stays single
    others.forEach((u, i) => {
      const c = definedCost(first!, u, o);
      if (c.allowed) walk(others.filter((_, j) => j !== i), pairs + 1, total + c.cost);
    });
  };
  walk(units, 0, 0);
  return best;
}

function randomUnit(r: () => number, id: string, bands: number, spread: number, withTs: boolean): Unit {
  return {
    id,
    levels: Array.from({ length: bands }, () => 90 + gaussian(r) * spread),
    ...(withTs ? { fs: 800 + gaussian(r) * 40, qts: 0.5 + gaussian(r) * 0.03 } : {}),
  };
}

// Seeds, band counts, stock sizes, spreads (dB) and weights, all invented for the test; the spread
// is set so that some draws fit the limit and some do not.
const CASES: [seed: number, bands: number, stock: number, spread: number, limitDb: number, fsWeight: number, qtsWeight: number][] = [
  [1, 12, 9, 0.3, 0.5, 0, 0],
  [2, 12, 9, 0.6, 0.5, 0, 0],
  [3, 17, 8, 0.25, 0.5, 1, 1],
  [4, 8, 10, 0.9, 1.0, 0.5, 0],
  [5, 20, 7, 1.5, 0.5, 0, 2],
  [6, 13, 0, 0.3, 0.5, 0, 0],
  [7, 13, 1, 0.3, 0.5, 0, 0],
];

describe("planReplacement against brute force", () => {
  test.each(CASES)("seed %i: %i bands, %i in stock, spread %f dB, limit %f dB, weights Fs %f Qts %f", (seed, bands, n, spread, limitDb, fsWeight, qtsWeight) => {
    const r = seededRandom(seed);
    const withTs = fsWeight > 0 || qtsWeight > 0;
    const survivor = randomUnit(r, "SURV", bands, spread, withTs);
    const stock = Array.from({ length: n }, (_, i) => randomUnit(r, `S${i + 1}`, bands, spread, withTs && randomInt(r, 0, 3) > 0));
    const o: MatchOptions = { limitDb, fsWeight, qtsWeight };
    const plan = planReplacement(survivor, stock, o);

    // Candidates: exactly the stock within the limit of the survivor, least cost first (PRODUCT.md §5).
    const expected = stock
      .map((u, index) => ({ id: u.id, index, ...definedCost(survivor, u, o) }))
      .filter((x) => x.allowed)
      .sort((a, b) => a.cost - b.cost || a.index - b.index);
    expect(plan.candidates.map((c) => c.id)).toEqual(expected.map((x) => x.id));
    plan.candidates.forEach((c, i) => {
      expect(c.cost).toBeCloseTo(expected[i]!.cost, 9);
      expect(c.maxDiffDb).toBeCloseTo(expected[i]!.maxDiffDb, 9);
      expect(c.maxDiffDb).toBeLessThanOrEqual(limitDb + 1e-9);
    });

    if (plan.candidates.length) {
      expect(plan.sets).toEqual([]);
      expect(plan.why).toBeNull();
      return;
    }
    // No single unit fits: the closest by largest band difference is named, and the sets are an
    // optimal matching of the stock (PRODUCT.md §4), best pair first, each within the limit.
    expect(plan.why).toMatch(n === 0 ? /no measured units in stock/ : /within the .* limit/);
    if (n > 0) {
      const nearest = Math.min(...stock.map((u) => definedCost(survivor, u, o).maxDiffDb));
      expect(plan.closest!.maxDiffDb).toBeCloseTo(nearest, 9);
    }
    const brute = bruteBestMatching(stock, o);
    expect(plan.sets.length).toBe(brute.pairs);
    expect(plan.sets.reduce((s, p) => s + p.cost, 0)).toBeCloseTo(brute.total, 6);
    for (let i = 1; i < plan.sets.length; i++) expect(plan.sets[i]!.cost).toBeGreaterThanOrEqual(plan.sets[i - 1]!.cost);
    for (const p of plan.sets) {
      const c = definedCost(stock.find((u) => u.id === p.a)!, stock.find((u) => u.id === p.b)!, o);
      expect(c.allowed).toBe(true);
      expect(p.cost).toBeCloseTo(c.cost, 9);
    }
  });

  test("the seeds above reach both branches: one fits, and none fits", () => {
    const branches = CASES.map(([seed, bands, n, spread, limitDb, fsWeight, qtsWeight]) => {
      const r = seededRandom(seed);
      const withTs = fsWeight > 0 || qtsWeight > 0;
      const survivor = randomUnit(r, "SURV", bands, spread, withTs);
      const stock = Array.from({ length: n }, (_, i) => randomUnit(r, `S${i + 1}`, bands, spread, withTs && randomInt(r, 0, 3) > 0));
      const plan = planReplacement(survivor, stock, { limitDb, fsWeight, qtsWeight });
      return plan.candidates.length > 0 ? "fits" : plan.sets.length > 0 ? "sets" : "nothing";
    });
    expect(new Set(branches)).toEqual(new Set(["fits", "sets", "nothing"]));
  });
});

describe("the reason given when no unit fits", () => {
  // Levels invented: three bands, the survivor flat at 0 dB.
  const survivor: Unit = { id: "D-TW-SURV", levels: [0, 0, 0] };
  test.each<[string, Unit[], RegExp]>([
    ["stock far off, two of it close to each other: replace both", [{ id: "A", levels: [0.8, 0, 0] }, { id: "B", levels: [0.9, 0.1, 0] }], /closest, A, differs by 0\.80 dB at 1\.6 kHz.*Replace both/],
    ["stock far off and far apart: wait for a part", [{ id: "A", levels: [0.8, 0, 0] }, { id: "B", levels: [-0.8, 0, 0] }], /order new units/],
    ["no stock at all", [], /no measured units in stock/],
  ])("%s", (_name, stock, why) => {
    const plan = planReplacement(survivor, stock, { limitDb: 0.5, bandLabels: ["1.6 kHz", "2 kHz", "2.5 kHz"] });
    expect(plan.candidates).toEqual([]);
    expect(plan.why).toMatch(why);
  });
});
