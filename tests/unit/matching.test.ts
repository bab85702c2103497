import { describe, expect, test } from "vitest";
import {
  LIMIT_EPSILON_DB,
  maxWeightMatching,
  pairCost,
  planPairs,
  planPairsWith,
  rankReplacements,
  solveMatching,
  type MatchOptions,
  type PairPlan,
  type Unit,
  type WeightedEdge,
} from "@/lib/matching";
import { gaussian as gauss, randomInt as int, seededRandom as rng } from "../fixtures/random";

// ---- helpers written from the definitions, independent of lib/matching -------------------------


/** The cost of a pair as the product rules define it. */
function definedCost(a: Unit, b: Unit, o: MatchOptions) {
  const d = a.levels.map((x, i) => x - b.levels[i]!);
  let cost = Math.sqrt(d.reduce((s, x) => s + x * x, 0) / d.length);
  if (o.fsWeight && a.fs !== undefined && b.fs !== undefined) cost += (o.fsWeight * Math.abs(a.fs - b.fs)) / ((a.fs + b.fs) / 2);
  if (o.qtsWeight && a.qts !== undefined && b.qts !== undefined) cost += (o.qtsWeight * Math.abs(a.qts - b.qts)) / ((a.qts + b.qts) / 2);
  const maxDiffDb = Math.max(...d.map(Math.abs));
  return { cost, maxDiffDb, allowed: maxDiffDb <= o.limitDb + 1e-9 };
}

/**
 * Exhaustive search: every set of disjoint allowed pairs. Unit i (the first not yet decided)
 * either stays single or pairs with a later undecided unit. Best = most pairs, then least cost.
 */
function oracle(units: Unit[], o: MatchOptions) {
  const n = units.length;
  const c = units.map((a) => units.map((b) => definedCost(a, b, o)));
  const used = new Array<boolean>(n).fill(false);
  let best = { pairs: 0, cost: 0 };
  const visit = (i: number, pairs: number, cost: number) => {
    while (i < n && used[i]) i++;
    if (i >= n) {
      if (pairs > best.pairs || (pairs === best.pairs && cost < best.cost)) best = { pairs, cost };
      return;
    }
    used[i] = true;
    visit(i + 1, pairs, cost); // i stays single
    for (let j = i + 1; j < n; j++) {
      if (used[j] || !c[i]![j]!.allowed) continue;
      used[j] = true;
      visit(i + 1, pairs + 1, cost + c[i]![j]!.cost);
      used[j] = false;
    }
    used[i] = false;
  };
  visit(0, 0, 0);
  return best;
}

/** The same optimum by dynamic programming over subsets (for up to ~18 units). */
function oracleDp(units: Unit[], o: MatchOptions) {
  const n = units.length;
  const c = units.map((a) => units.map((b) => definedCost(a, b, o)));
  const size = 1 << n;
  const pairs = new Int32Array(size).fill(-1);
  const cost = new Float64Array(size);
  pairs[0] = 0;
  // best(mask) for the units in mask; the lowest unit of mask is single or paired within mask.
  for (let mask = 1; mask < size; mask++) {
    const i = 31 - Math.clz32(mask & -mask);
    const rest = mask & ~(1 << i);
    let bp = pairs[rest]!;
    let bc = cost[rest]!;
    for (let j = i + 1; j < n; j++) {
      if (!(rest & (1 << j)) || !c[i]![j]!.allowed) continue;
      const sub = rest & ~(1 << j);
      const p = pairs[sub]! + 1;
      const q = cost[sub]! + c[i]![j]!.cost;
      if (p > bp || (p === bp && q < bc)) {
        bp = p;
        bc = q;
      }
    }
    pairs[mask] = bp;
    cost[mask] = bc;
  }
  return { pairs: pairs[size - 1]!, cost: cost[size - 1]! };
}

/** The workshop's greedy by hand: the cheapest allowed pair of free units, first in input order on a tie. */
function handGreedy(units: Unit[], o: MatchOptions) {
  const free = new Set(units.map((_, i) => i));
  let pairs = 0;
  let cost = 0;
  for (;;) {
    let best: { i: number; j: number; cost: number } | null = null;
    for (const i of free)
      for (const j of free) {
        if (j <= i) continue;
        const c = definedCost(units[i]!, units[j]!, o);
        if (c.allowed && (!best || c.cost < best.cost)) best = { i, j, cost: c.cost };
      }
    if (!best) return { pairs, cost };
    free.delete(best.i);
    free.delete(best.j);
    pairs++;
    cost += best.cost;
  }
}

/** A batch like the lab's: a common curve, per-unit deviations, sometimes rounded, tied or with Fs/Qts. */
function randomBatch(r: () => number, n: number, bands: number) {
  const sigma = 0.2 + r() * 0.8;
  const curve = Array.from({ length: bands }, (_, i) => 85 + 3 * Math.sin(i / 3));
  const round = r() < 0.4 ? 10 : 1e6; // 0.1 dB steps make ties likely
  const units: Unit[] = [];
  for (let k = 0; k < n; k++) {
    const copy = k > 0 && r() < 0.1 ? units[int(r, 0, k - 1)]! : null;
    const levels = copy ? [...copy.levels] : curve.map((c) => Math.round((c + sigma * gauss(r)) * round) / round);
    const u: Unit = { id: `U${k + 1}`, levels };
    if (r() < 0.7) u.fs = 30 + r() * 10;
    if (r() < 0.7) u.qts = 0.3 + r() * 0.2;
    units.push(u);
  }
  const opts: MatchOptions = { limitDb: sigma * (0.8 + r() * 3) };
  if (r() < 0.5) opts.fsWeight = r() * 2;
  if (r() < 0.5) opts.qtsWeight = r() * 2;
  return { units, opts };
}

/** Checks every rule of a plan that does not need the optimum. */
function checkPlan(plan: PairPlan, units: Unit[], o: MatchOptions) {
  const index = new Map(units.map((u, i) => [u.id, i]));
  const seen = new Set<string>();
  let total = 0;
  let previous = -Infinity;
  for (const p of plan.pairs) {
    expect(index.get(p.a)!).toBeLessThan(index.get(p.b)!);
    for (const id of [p.a, p.b]) {
      expect(seen.has(id), `${id} appears twice`).toBe(false);
      seen.add(id);
    }
    const c = definedCost(units[index.get(p.a)!]!, units[index.get(p.b)!]!, o);
    expect(c.allowed).toBe(true);
    expect(p.cost).toBeCloseTo(c.cost, 12);
    expect(p.maxDiffDb).toBeCloseTo(c.maxDiffDb, 12);
    expect(p.cost).toBeGreaterThanOrEqual(previous);
    previous = p.cost;
    total += p.cost;
  }
  for (const s of plan.single) {
    expect(seen.has(s.id), `${s.id} is both paired and single`).toBe(false);
    seen.add(s.id);
    expect(s.reason.length).toBeGreaterThan(0);
  }
  expect(seen.size).toBe(units.length);
  expect(plan.single.map((s) => index.get(s.id)!)).toEqual([...plan.single.map((s) => index.get(s.id)!)].sort((a, b) => a - b));
  expect(Math.abs(plan.totalCost - total)).toBeLessThan(1e-9);
  expect(plan.pairs.length).toBeGreaterThanOrEqual(plan.greedyPairs);
  if (plan.pairs.length === plan.greedyPairs) expect(plan.totalCost).toBeLessThanOrEqual(plan.greedyTotalCost + 1e-9);
}

// ---- the plan against exhaustive search -----------------------------------------------------------

describe("planPairs against exhaustive search", () => {
  test("300 seeded random batches of 0–10 units: most pairs, then least cost; greedy as by hand", () => {
    const r = rng(20250611);
    let disallowed = 0;
    let greedyWorse = 0;
    for (let batch = 0; batch < 300; batch++) {
      const { units, opts } = randomBatch(r, int(r, 0, 10), int(r, 5, 31));
      const best = oracle(units, opts);
      const hand = handGreedy(units, opts);
      // The default plan, a sparse first round of one or two candidates per unit (so the rounds and
      // their optimality proof are exercised even on small batches), and all pairs at once.
      for (const candidatesPerUnit of [undefined, 1, 2, Infinity]) {
        const plan = candidatesPerUnit === undefined ? planPairs(units, opts) : planPairsWith(units, opts, { candidatesPerUnit });
        const where = `batch ${batch}, candidates ${candidatesPerUnit}`;
        checkPlan(plan, units, opts);
        expect(plan.pairs.length, where).toBe(best.pairs);
        expect(Math.abs(plan.totalCost - best.cost), where).toBeLessThan(1e-9);
        expect(plan.greedyPairs, where).toBe(hand.pairs);
        expect(Math.abs(plan.greedyTotalCost - hand.cost), where).toBeLessThan(1e-9);
      }
      for (let i = 0; i < units.length; i++)
        for (let j = i + 1; j < units.length; j++) if (!definedCost(units[i]!, units[j]!, opts).allowed) disallowed++;
      if (hand.pairs < best.pairs || hand.cost > best.cost + 1e-9) greedyWorse++;
    }
    // The batches really do exercise the limit and beat the greedy pairing.
    expect(disallowed).toBeGreaterThan(1000);
    expect(greedyWorse).toBeGreaterThan(10);
  });

  test("24 seeded batches of 12–18 units against dynamic programming over subsets", () => {
    const r = rng(7001);
    for (let batch = 0; batch < 24; batch++) {
      const { units, opts } = randomBatch(r, int(r, 12, 18), int(r, 5, 31));
      const best = oracleDp(units, opts);
      for (const candidatesPerUnit of [undefined, 1, 3]) {
        const plan = candidatesPerUnit === undefined ? planPairs(units, opts) : planPairsWith(units, opts, { candidatesPerUnit });
        checkPlan(plan, units, opts);
        expect(plan.pairs.length).toBe(best.pairs);
        expect(Math.abs(plan.totalCost - best.cost)).toBeLessThan(1e-9);
      }
    }
  });

  test("dense batches of 40–150 units: the sparse rounds give the same optimum as all pairs at once", () => {
    const r = rng(4242);
    for (let batch = 0; batch < 12; batch++) {
      const n = int(r, 40, 150);
      const curve = Array.from({ length: 31 }, (_, i) => 80 + Math.cos(i / 5));
      const units: Unit[] = Array.from({ length: n }, (_, k) => ({ id: `D${k}`, levels: curve.map((c) => c + 0.3 * gauss(r)) }));
      const opts = { limitDb: 0.8 + r() * 0.6 };
      const all = planPairsWith(units, opts, { candidatesPerUnit: Infinity });
      checkPlan(all, units, opts);
      for (const candidatesPerUnit of [1, 2, 8]) {
        const plan = planPairsWith(units, opts, { candidatesPerUnit });
        checkPlan(plan, units, opts);
        expect(plan.pairs.length).toBe(all.pairs.length);
        expect(Math.abs(plan.totalCost - all.totalCost)).toBeLessThan(1e-9);
      }
    }
  });
});

// ---- the matcher itself ------------------------------------------------------------------------

describe("maxWeightMatching: the published cases of van Rantwijk's mwmatching.py", () => {
  // Source: Joris van Rantwijk, mwmatching.py (public domain; first release 2008-06-08, revised
  // 2013-04-07), class MaxWeightMatchingTests in its `if __name__ == '__main__':` block. Edges and
  // expected mates transcribed from a copy of that file (not from memory); names as there.
  const cases: [string, WeightedEdge[], boolean, number[]][] = [
    ["test10_empty: empty input graph", [], false, []],
    ["test11_singleedge: single edge", [[0, 1, 1]], false, [1, 0]],
    ["test12", [[1, 2, 10], [2, 3, 11]], false, [-1, -1, 3, 2]],
    ["test13", [[1, 2, 5], [2, 3, 11], [3, 4, 5]], false, [-1, -1, 3, 2, -1]],
    ["test14_maxcard: maximum cardinality", [[1, 2, 5], [2, 3, 11], [3, 4, 5]], true, [-1, 2, 1, 4, 3]],
    ["test15_float: floating point weights", [[1, 2, Math.PI], [2, 3, Math.exp(1)], [1, 3, 3.0], [1, 4, Math.sqrt(2.0)]], false, [-1, 4, 3, 2, 1]],
    ["test16_negative: negative weights", [[1, 2, 2], [1, 3, -2], [2, 3, 1], [2, 4, -1], [3, 4, -6]], false, [-1, 2, 1, -1, -1]],
    ["test16_negative (maxcardinality)", [[1, 2, 2], [1, 3, -2], [2, 3, 1], [2, 4, -1], [3, 4, -6]], true, [-1, 3, 4, 1, 2]],
    ["test20_sblossom: create S-blossom and use it for augmentation", [[1, 2, 8], [1, 3, 9], [2, 3, 10], [3, 4, 7]], false, [-1, 2, 1, 4, 3]],
    ["test20_sblossom (second)", [[1, 2, 8], [1, 3, 9], [2, 3, 10], [3, 4, 7], [1, 6, 5], [4, 5, 6]], false, [-1, 6, 3, 2, 5, 4, 1]],
    ["test21_tblossom: create S-blossom, relabel as T-blossom, use for augmentation", [[1, 2, 9], [1, 3, 8], [2, 3, 10], [1, 4, 5], [4, 5, 4], [1, 6, 3]], false, [-1, 6, 3, 2, 5, 4, 1]],
    ["test21_tblossom (second)", [[1, 2, 9], [1, 3, 8], [2, 3, 10], [1, 4, 5], [4, 5, 3], [1, 6, 4]], false, [-1, 6, 3, 2, 5, 4, 1]],
    ["test21_tblossom (third)", [[1, 2, 9], [1, 3, 8], [2, 3, 10], [1, 4, 5], [4, 5, 3], [3, 6, 4]], false, [-1, 2, 1, 6, 5, 4, 3]],
    ["test22_s_nest: create nested S-blossom, use for augmentation", [[1, 2, 9], [1, 3, 9], [2, 3, 10], [2, 4, 8], [3, 5, 8], [4, 5, 10], [5, 6, 6]], false, [-1, 3, 4, 1, 2, 6, 5]],
    [
      "test23_s_relabel_nest: create S-blossom, relabel as S, include in nested S-blossom",
      [[1, 2, 10], [1, 7, 10], [2, 3, 12], [3, 4, 20], [3, 5, 20], [4, 5, 25], [5, 6, 10], [6, 7, 10], [7, 8, 8]],
      false,
      [-1, 2, 1, 4, 3, 6, 5, 8, 7],
    ],
    [
      "test24_s_nest_expand: create nested S-blossom, augment, expand recursively",
      [[1, 2, 8], [1, 3, 8], [2, 3, 10], [2, 4, 12], [3, 5, 12], [4, 5, 14], [4, 6, 12], [5, 7, 12], [6, 7, 14], [7, 8, 12]],
      false,
      [-1, 2, 1, 5, 6, 3, 4, 8, 7],
    ],
    [
      "test25_s_t_expand: create S-blossom, relabel as T, expand",
      [[1, 2, 23], [1, 5, 22], [1, 6, 15], [2, 3, 25], [3, 4, 22], [4, 5, 25], [4, 8, 14], [5, 7, 13]],
      false,
      [-1, 6, 3, 2, 8, 7, 1, 5, 4],
    ],
    [
      "test26_s_nest_t_expand: create nested S-blossom, relabel as T, expand",
      [[1, 2, 19], [1, 3, 20], [1, 8, 8], [2, 3, 25], [2, 4, 18], [3, 5, 18], [4, 5, 13], [4, 7, 7], [5, 6, 7]],
      false,
      [-1, 8, 3, 2, 7, 6, 5, 4, 1],
    ],
    [
      "test30_tnasty_expand: create blossom, relabel as T in more than one way, expand, augment",
      [[1, 2, 45], [1, 5, 45], [2, 3, 50], [3, 4, 45], [4, 5, 50], [1, 6, 30], [3, 9, 35], [4, 8, 35], [5, 7, 26], [9, 10, 5]],
      false,
      [-1, 6, 3, 2, 8, 7, 1, 5, 4, 10, 9],
    ],
    [
      "test31_tnasty2_expand: again but slightly different",
      [[1, 2, 45], [1, 5, 45], [2, 3, 50], [3, 4, 45], [4, 5, 50], [1, 6, 30], [3, 9, 35], [4, 8, 26], [5, 7, 40], [9, 10, 5]],
      false,
      [-1, 6, 3, 2, 8, 7, 1, 5, 4, 10, 9],
    ],
    [
      "test32_t_expand_leastslack: create blossom, relabel as T, expand such that a new least-slack S-to-free edge is produced, augment",
      [[1, 2, 45], [1, 5, 45], [2, 3, 50], [3, 4, 45], [4, 5, 50], [1, 6, 30], [3, 9, 35], [4, 8, 28], [5, 7, 26], [9, 10, 5]],
      false,
      [-1, 6, 3, 2, 8, 7, 1, 5, 4, 10, 9],
    ],
    [
      "test33_nest_tnasty_expand: create nested blossom, relabel as T in more than one way, expand outer blossom such that inner blossom ends up on an augmenting path",
      [[1, 2, 45], [1, 7, 45], [2, 3, 50], [3, 4, 45], [4, 5, 95], [4, 6, 94], [5, 6, 94], [6, 7, 50], [1, 8, 30], [3, 11, 35], [5, 9, 36], [7, 10, 26], [11, 12, 5]],
      false,
      [-1, 8, 3, 2, 6, 9, 4, 10, 1, 5, 7, 12, 11],
    ],
    [
      "test34_nest_relabel_expand: create nested S-blossom, relabel as S, expand recursively",
      [[1, 2, 40], [1, 3, 40], [2, 3, 60], [2, 4, 55], [3, 5, 55], [4, 5, 50], [1, 8, 15], [5, 7, 30], [7, 6, 10], [8, 10, 10], [4, 9, 30]],
      false,
      [-1, 2, 1, 5, 9, 3, 7, 6, 10, 4, 8],
    ],
  ];
  test.each(cases)("%s", (_name, edges, maxCardinality, expected) => {
    expect(maxWeightMatching(edges, maxCardinality)).toEqual(expected);
    // The original runs these with CHECK_OPTIMUM (its dual certificate) on integer weights.
    if (edges.every(([, , w]) => Number.isInteger(w))) expect(maxWeightMatching(edges, maxCardinality, { verify: true })).toEqual(expected);
  });

  test("bad edges are refused", () => {
    expect(() => maxWeightMatching([[0, 0, 1]])).toThrow(/itself/);
    expect(() => maxWeightMatching([[-1, 2, 1]])).toThrow(/non-negative integers/);
    expect(() => maxWeightMatching([[0, 1.5, 1]])).toThrow(/non-negative integers/);
    expect(() => maxWeightMatching([[0, 1, Number.NaN]])).toThrow(/finite/);
  });
});

describe("maxWeightMatching against brute force", () => {
  /** Best (cardinality first if maxCardinality, then weight) over all matchings of the edge list. */
  function bruteForce(edges: WeightedEdge[], maxCardinality: boolean) {
    let best = { size: 0, weight: 0 };
    const used = new Set<number>();
    const visit = (k: number, size: number, weight: number) => {
      if (k === edges.length) {
        const better = maxCardinality ? size > best.size || (size === best.size && weight > best.weight) : weight > best.weight;
        if (better) best = { size, weight };
        return;
      }
      visit(k + 1, size, weight);
      const [i, j, w] = edges[k]!;
      if (used.has(i) || used.has(j)) return;
      used.add(i).add(j);
      visit(k + 1, size + 1, weight + w);
      used.delete(i);
      used.delete(j);
    };
    visit(0, 0, 0);
    return best;
  }

  test("400 seeded random graphs of up to 10 vertices, integer weights (some ≤ 0), both modes, certificate checked", () => {
    const r = rng(99);
    for (let g = 0; g < 400; g++) {
      const n = int(r, 2, 10);
      const density = r();
      const edges: WeightedEdge[] = [];
      for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) if (r() < density) edges.push(r() < 0.5 ? [i, j, int(r, -5, 30)] : [j, i, int(r, 1, 8)]);
      for (const maxCardinality of [false, true]) {
        const mate = maxWeightMatching(edges, maxCardinality, { verify: true });
        let size = 0;
        let weight = 0;
        for (const [i, j, w] of edges) {
          if (mate[i] === j) {
            expect(mate[j]).toBe(i);
            size++;
            weight += w;
          }
        }
        expect(mate.filter((x) => x >= 0).length).toBe(2 * size);
        const best = bruteForce(edges, maxCardinality);
        if (maxCardinality) expect(size).toBe(best.size);
        expect(weight).toBe(best.weight);
      }
    }
  });

  test("larger random graphs (up to 80 vertices): the dual certificate holds in both modes", () => {
    const r = rng(123);
    for (let g = 0; g < 30; g++) {
      const n = int(r, 20, 80);
      const density = 0.05 + r() * 0.9;
      const edges: WeightedEdge[] = [];
      for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) if (r() < density) edges.push([i, j, int(r, 1, 1000)]);
      for (const maxCardinality of [false, true]) expect(() => maxWeightMatching(edges, maxCardinality, { verify: true })).not.toThrow();
    }
  });

  test("solveMatching's alsoCheck: with no violated edge left out, the subgraph's matching is optimal for the whole graph", () => {
    const r = rng(5);
    let certified = 0;
    for (let g = 0; g < 200; g++) {
      const n = int(r, 4, 10);
      const edges: WeightedEdge[] = [];
      for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) if (r() < 0.8) edges.push([i, j, int(r, 1, 40)]);
      const keep = edges.filter(() => r() < 0.6);
      const rest = edges.filter((e) => !keep.includes(e));
      const arrays = (es: WeightedEdge[]) => ({ eu: Int32Array.from(es, (e) => e[0]), ev: Int32Array.from(es, (e) => e[1]), ew: Float64Array.from(es, (e) => e[2]) });
      const sub = arrays(keep);
      const res = solveMatching(n, sub.eu, sub.ev, sub.ew, false, { alsoCheck: arrays(rest) });
      if (res.violated.length > 0) continue;
      certified++;
      const weight = keep.reduce((s, [i, j, w]) => s + (res.mate[i] === j ? w : 0), 0);
      expect(weight).toBe(bruteForce(edges, false).weight);
    }
    expect(certified).toBeGreaterThan(20);
  });
});

// ---- the cost, the limit, the reasons ----------------------------------------------------------------

describe("pairCost", () => {
  const a: Unit = { id: "A", levels: [1, 2, 3], fs: 40, qts: 0.4 };
  const b: Unit = { id: "B", levels: [1.5, 2, 2], fs: 44, qts: 0.5 };

  test("RMS of the level differences, largest difference and its band", () => {
    // Differences −0.5, 0, 1: mean square (0.25 + 0 + 1) / 3.
    expect(pairCost(a, b)).toEqual({ cost: Math.sqrt((0.25 + 0 + 1) / 3), maxDiffDb: 1, worstBand: 2 });
  });

  test("plus the weighted relative Fs and Qts differences where both units have them", () => {
    const rms = Math.sqrt((0.25 + 0 + 1) / 3);
    expect(pairCost(a, b, { fsWeight: 0.5 }).cost).toBeCloseTo(rms + (0.5 * 4) / 42, 12);
    expect(pairCost(a, b, { qtsWeight: 2 }).cost).toBeCloseTo(rms + (2 * 0.1) / 0.45, 12);
    expect(pairCost(a, b, { limitDb: 1, fsWeight: 0.5, qtsWeight: 2 }).cost).toBeCloseTo(rms + (0.5 * 4) / 42 + (2 * 0.1) / 0.45, 12);
    const noFs: Unit = { id: "C", levels: [1.5, 2, 2], qts: 0.5 };
    expect(pairCost(a, noFs, { fsWeight: 0.5 }).cost).toBeCloseTo(rms, 12);
  });

  test("the first band wins a tie for the worst band", () => {
    expect(pairCost({ id: "A", levels: [0, 1, -1] }, { id: "B", levels: [0, 0, 0] }).worstBand).toBe(1);
  });
});

describe("the limit", () => {
  const u = (id: string, ...levels: number[]): Unit => ({ id, levels });

  test("a pair exactly at the limit is allowed, also when the subtraction rounds up", () => {
    expect(planPairs([u("A", 0, 0), u("B", 0.5, -0.5)], { limitDb: 0.5 }).pairs).toHaveLength(1);
    // 1.1 − 0.6 is 0.5000000000000001 in binary floating point.
    expect(1.1 - 0.6).toBeGreaterThan(0.5);
    const plan = planPairs([u("A", 1.1), u("B", 0.6)], { limitDb: 0.5 });
    expect(plan.pairs).toEqual([{ a: "A", b: "B", cost: 1.1 - 0.6, maxDiffDb: 1.1 - 0.6, worstBand: 0 }]);
    expect(LIMIT_EPSILON_DB).toBe(1e-9);
  });

  test("just above the limit is not", () => {
    const plan = planPairs([u("A", 0, 0), u("B", 0.5 + 1e-6, 0)], { limitDb: 0.5 });
    expect(plan.pairs).toEqual([]);
    expect(plan.single.map((s) => s.id)).toEqual(["A", "B"]);
    // Enough decimals that the difference does not read as the limit itself.
    expect(plan.single[0]!.reason).toBe("no partner within 0.5 dB: the closest, B, differs by 0.500001 dB at band 1 of 2");
    expect(rankReplacements(u("A", 0, 0), [u("B", 0.5 + 1e-6, 0)], { limitDb: 0.5 })).toEqual([]);
  });
});

describe("why a unit is single", () => {
  const flat = (id: string, bands: number, set: Record<number, number> = {}): Unit => ({ id, levels: Array.from({ length: bands }, (_, i) => set[i] ?? 0) });

  test("no partner within the limit: names the closest unit, the difference and the band", () => {
    const units = [flat("U1", 13), flat("U2", 13, { 12: 0.1 }), flat("U3", 13, { 12: 0.92 })];
    const plan = planPairs(units, { limitDb: 0.5 });
    expect(plan.pairs.map((p) => [p.a, p.b])).toEqual([["U1", "U2"]]);
    const diff = pairCost(units[2]!, units[1]!).maxDiffDb; // 0.92 − 0.1, the closest of the two
    expect(plan.single).toEqual([{ id: "U3", reason: `no partner within 0.5 dB: the closest, U2, differs by ${diff.toFixed(2)} dB at band 13 of 13`, closest: { id: "U2", maxDiffDb: diff, worstBand: 12 } }]);
  });

  test.each<[string, number]>([
    ["1.6 kHz", 12],
    ["20 Hz", 0],
  ])("with the bands' names given, the band is named as people say it: %s", (label, band) => {
    // Thirteen invented band names; only the one at the worst band matters.
    const labels = Array.from({ length: 13 }, (_, i) => (i === band ? label : `name ${i}`));
    const units = [flat("U1", 13), flat("U2", 13, { [band]: 2.22 })];
    const plan = planPairs(units, { limitDb: 1, bandLabels: labels });
    expect(plan.single[0]!.reason).toBe(`no partner within 1 dB: the closest, U2, differs by 2.22 dB at ${label}`);
  });

  test("partners better used elsewhere: a star whose centre can take one leaf only", () => {
    // Each leaf is within 0.45 dB of the centre A, and more than 0.45 dB from every other leaf.
    const units: Unit[] = [
      { id: "A", levels: [0, 0] },
      { id: "B", levels: [0.3, 0.3] },
      { id: "C", levels: [-0.4, -0.4] },
      { id: "D", levels: [0.4, -0.4] },
    ];
    const opts = { limitDb: 0.45 };
    const plan = planPairs(units, opts);
    expect(plan.pairs.map((p) => [p.a, p.b])).toEqual([["A", "B"]]);
    const toA = (i: number) => pairCost(units[i]!, units[0]!).cost.toFixed(2).replace(/0+$/, "").replace(/\.$/, "");
    expect(plan.single).toEqual([
      { id: "C", reason: `its possible partners are better used elsewhere; the closest allowed was A (cost ${toA(2)} dB RMS)` },
      { id: "D", reason: `its possible partners are better used elsewhere; the closest allowed was A (cost ${toA(3)} dB RMS)` },
    ]);
  });

  test("odd one out", () => {
    const units: Unit[] = [
      { id: "X", levels: [0] },
      { id: "Y", levels: [0.1] },
      { id: "Z", levels: [0.3] },
    ];
    const plan = planPairs(units, { limitDb: 1 });
    expect(plan.pairs.map((p) => [p.a, p.b])).toEqual([["X", "Y"]]);
    const cost = pairCost(units[2]!, units[1]!).cost.toFixed(2).replace(/0+$/, "");
    expect(plan.single).toEqual([{ id: "Z", reason: `odd one out: with an odd number of units one stays unpaired; the closest allowed was Y (cost ${cost} dB RMS)` }]);
    expect(planPairs([units[0]!], { limitDb: 1 }).single).toEqual([{ id: "X", reason: "odd one out: no other unit in the batch" }]);
  });

  test("an empty batch is an empty plan", () => {
    expect(planPairs([], { limitDb: 1 })).toEqual({ pairs: [], single: [], totalCost: 0, greedyTotalCost: 0, greedyPairs: 0 });
  });
});

describe("planPairs against the greedy pairing, by hand", () => {
  const line = (...xs: number[]): Unit[] => xs.map((x, i) => ({ id: String.fromCharCode(65 + i), levels: [x] }));

  test("greedy takes the cheapest pair first and pays for it later", () => {
    const units = line(0, 1, 1.8, 2.8); // greedy: B–C (0.8), then A–D (2.8); best: A–B (1) + C–D (1)
    const plan = planPairs(units, { limitDb: 3 });
    expect(plan.pairs.map((p) => [p.a, p.b]).sort()).toEqual([
      ["A", "B"],
      ["C", "D"],
    ]);
    expect(plan.greedyPairs).toBe(2);
    expect(plan.greedyTotalCost).toBeCloseTo(1.8 - 1 + 2.8, 12);
    expect(plan.totalCost).toBeCloseTo(1 + (2.8 - 1.8), 12);
  });

  test("greedy can make fewer pairs", () => {
    const units = line(0, 0.9, 1.3, 2.2); // allowed: A–B, B–C, C–D; greedy takes B–C and strands A and D
    const plan = planPairs(units, { limitDb: 1 });
    expect(plan.pairs.map((p) => [p.a, p.b]).sort()).toEqual([
      ["A", "B"],
      ["C", "D"],
    ]);
    expect(plan.greedyPairs).toBe(1);
    expect(plan.single).toEqual([]);
  });

  test("pairs are sorted by cost, the earlier unit first", () => {
    const units: Unit[] = [
      { id: "P", levels: [5] },
      { id: "Q", levels: [0] },
      { id: "R", levels: [5.4] },
      { id: "S", levels: [0.1] },
    ];
    expect(planPairs(units, { limitDb: 1 }).pairs.map((p) => [p.a, p.b])).toEqual([
      ["Q", "S"],
      ["P", "R"],
    ]);
  });
});

describe("rankReplacements", () => {
  const survivor: Unit = { id: "L7", levels: [0, 0, 0] };
  const stock: Unit[] = [
    { id: "S1", levels: [0.3, 0, 0] },
    { id: "S2", levels: [0.9, 0, 0] }, // over the 0.5 dB limit
    { id: "S3", levels: [0.1, 0.1, 0] },
    { id: "S4", levels: [0, 0.3, 0] }, // the same cost as S1: after it, in stock order
    { id: "S5", levels: [0.5, 0, 0] }, // exactly at the limit
  ];

  test("within the limit only, cheapest first, ties in stock order", () => {
    const ranked = rankReplacements(survivor, stock, { limitDb: 0.5 });
    expect(ranked.map((x) => x.id)).toEqual(["S3", "S1", "S4", "S5"]);
    for (const x of ranked) {
      const c = pairCost(survivor, stock.find((s) => s.id === x.id)!);
      expect(x).toEqual({ id: x.id, cost: c.cost, maxDiffDb: c.maxDiffDb });
    }
  });

  test("weights count", () => {
    const s: Unit = { ...survivor, fs: 40 };
    const withFs = [
      { id: "F1", levels: [0.1, 0, 0], fs: 48 },
      { id: "F2", levels: [0.2, 0, 0], fs: 40 },
    ];
    expect(rankReplacements(s, withFs, { limitDb: 0.5 }).map((x) => x.id)).toEqual(["F1", "F2"]);
    expect(rankReplacements(s, withFs, { limitDb: 0.5, fsWeight: 1 }).map((x) => x.id)).toEqual(["F2", "F1"]);
  });

  test("an empty stock gives nothing; bad input is refused", () => {
    expect(rankReplacements(survivor, [], { limitDb: 0.5 })).toEqual([]);
    expect(() => rankReplacements(survivor, [{ id: "L7", levels: [0, 0, 0] }], { limitDb: 0.5 })).toThrow(/duplicate unit id "L7"/);
    expect(() => rankReplacements(survivor, [{ id: "S1", levels: [0, 0] }], { limitDb: 0.5 })).toThrow(/2 levels but "L7" has 3/);
    expect(() => rankReplacements(survivor, stock, { limitDb: 0 })).toThrow(/limitDb/);
  });
});

describe("bad input", () => {
  const ok: Unit[] = [
    { id: "A", levels: [0, 1] },
    { id: "B", levels: [0, 1.2] },
  ];
  test.each([
    ["units with different numbers of levels", [ok[0]!, { id: "B", levels: [0, 1, 2] }], { limitDb: 1 }, /"B" has 3 levels but "A" has 2: every unit must be measured in the same bands/],
    ["a duplicate id", [ok[0]!, { id: "A", levels: [0, 1] }], { limitDb: 1 }, /duplicate unit id "A"/],
    ["a level that is not a number", [ok[0]!, { id: "B", levels: [0, Number.NaN] }], { limitDb: 1 }, /"B" has a level that is not a finite number at band 1/],
    ["an infinite level", [ok[0]!, { id: "B", levels: [Number.POSITIVE_INFINITY, 0] }], { limitDb: 1 }, /not a finite number at band 0/],
    ["no levels", [{ id: "A", levels: [] }], { limitDb: 1 }, /no levels/],
    ["an empty id", [{ id: "", levels: [0] }], { limitDb: 1 }, /non-empty id/],
    ["Fs of 0", [{ ...ok[0]!, fs: 0 }, ok[1]!], { limitDb: 1 }, /Fs 0/],
    ["a limit of 0", ok, { limitDb: 0 }, /limitDb must be a number greater than 0/],
    ["a negative limit", ok, { limitDb: -0.5 }, /limitDb must be a number greater than 0/],
    ["a limit that is not a number", ok, { limitDb: Number.NaN }, /limitDb/],
    ["a negative weight", ok, { limitDb: 1, fsWeight: -1 }, /fsWeight must be a finite number ≥ 0/],
  ] as [string, Unit[], MatchOptions, RegExp][])("%s", (_label, units, opts, message) => {
    expect(() => planPairs(units, opts)).toThrow(message);
  });

  test("pairCost checks its units too", () => {
    expect(() => pairCost(ok[0]!, { id: "B", levels: [1] })).toThrow(/same bands/);
  });
});
