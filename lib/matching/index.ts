/**
 * Matching drive units into left/right pairs. Pure TypeScript: no server import, no Node API, so
 * the same code can run in a route handler, a script or the browser.
 *
 * The lab measures each drive unit's level (dB) in the same frequency bands, and optionally its
 * Thiele/Small resonance frequency Fs and total Q (Qts). Two units may share a pair only if they
 * never differ by more than `limitDb` in any band. Among the allowed pairs, `planPairs` pairs as
 * many units as possible and, among the plans that do, chooses the one of least total cost: a
 * maximum-cardinality minimum-weight matching on the general graph whose vertices are the units
 * and whose edges are the allowed pairs. It is solved exactly by Edmonds' blossom algorithm
 * (`./blossom.ts`, a port of van Rantwijk's mwmatching.py).
 *
 * `worstBand` is an index into `levels` (0 = the first band). Messages name a band by
 * `MatchOptions.bandLabels` ("1.6 kHz") when the caller gives them, else by its place ("band 14 of 20").
 */
import { solveMatching } from "./blossom";

export { maxWeightMatching, solveMatching, type MatchingResult, type MatchingRunOptions, type WeightedEdge } from "./blossom";

export interface Unit {
  id: string;
  /** Level in dB in each band, the same bands in the same order for every unit of a batch. */
  levels: number[];
  /** Resonance frequency in Hz, if measured (> 0). */
  fs?: number;
  /** Total Q, if measured (> 0). */
  qts?: number;
}

export interface MatchOptions {
  /** Largest difference allowed in any one band, in dB (> 0). A pair exactly at the limit is allowed. */
  limitDb: number;
  /** Weight of the relative Fs difference |ΔFs| / mean(Fs) in the cost (default 0). */
  fsWeight?: number;
  /** Weight of the relative Qts difference |ΔQts| / mean(Qts) in the cost (default 0). */
  qtsWeight?: number;
  /** The bands' names for messages, one per level ("1.6 kHz"); words only, never used to compute. */
  bandLabels?: readonly string[];
}

export interface PlannedPair {
  /** The unit that comes first in the input. */
  a: string;
  b: string;
  cost: number;
  maxDiffDb: number;
  /** The band of the largest difference (an index into `levels`). */
  worstBand: number;
}

export interface SingleUnit {
  id: string;
  reason: string;
  /** When no unit is within the limit of it: the closest one, how far and where (so a page can say why nothing pairs). */
  closest?: { id: string; maxDiffDb: number; worstBand: number };
}

export interface PairPlan {
  /** By cost, least first (ties: by input order of a, then of b). */
  pairs: PlannedPair[];
  /** Units left unpaired, in input order, each with the reason. */
  single: SingleUnit[];
  totalCost: number;
  /** What the nearest-neighbour pairing by hand would cost, and how many pairs it makes. */
  greedyTotalCost: number;
  greedyPairs: number;
}

export interface PairCost {
  cost: number;
  maxDiffDb: number;
  /** The band of the largest difference (the first such band on a tie). */
  worstBand: number;
}

export interface Replacement {
  id: string;
  cost: number;
  maxDiffDb: number;
}

/**
 * Tolerance on the limit, in dB. Levels are decimal numbers stored in binary floating point, so a
 * difference that is exactly the limit on paper can come out a hair above it (1.1 − 0.6 is
 * 0.5000000000000001). A pair is allowed when maxDiffDb ≤ limitDb + 1e-9: far below any
 * measurement resolution, far above the rounding of a subtraction of levels of ordinary size.
 */
export const LIMIT_EPSILON_DB = 1e-9;

type Weights = { fsWeight: number; qtsWeight: number };

// ---- input checks -------------------------------------------------------------------------------

function checkWeights(opts: Pick<MatchOptions, "fsWeight" | "qtsWeight">): Weights {
  const fsWeight = opts.fsWeight ?? 0;
  const qtsWeight = opts.qtsWeight ?? 0;
  for (const [name, w] of [
    ["fsWeight", fsWeight],
    ["qtsWeight", qtsWeight],
  ] as const) {
    if (typeof w !== "number" || !Number.isFinite(w) || w < 0) throw new Error(`${name} must be a finite number ≥ 0 (got ${String(w)})`);
  }
  return { fsWeight, qtsWeight };
}

function checkOptions(opts: MatchOptions): Weights {
  if (opts === null || typeof opts !== "object") throw new Error("options are required ({ limitDb })");
  const { limitDb } = opts;
  if (typeof limitDb !== "number" || Number.isNaN(limitDb) || limitDb <= 0) {
    throw new Error(`limitDb must be a number greater than 0 dB (got ${String(limitDb)})`);
  }
  return checkWeights(opts);
}

/** Checks one batch; returns the number of bands (0 for an empty batch). */
function checkUnits(units: readonly Unit[], bandsFrom?: Unit): number {
  if (!Array.isArray(units)) throw new Error("units must be an array");
  const all = bandsFrom ? [bandsFrom, ...units] : units;
  const seen = new Set<string>();
  let bands = -1;
  let first = "";
  for (const u of all) {
    if (u === null || typeof u !== "object") throw new Error("every unit must be an object { id, levels }");
    if (typeof u.id !== "string" || u.id === "") throw new Error("every unit needs a non-empty id");
    if (seen.has(u.id)) throw new Error(`duplicate unit id "${u.id}": each unit may appear once`);
    seen.add(u.id);
    if (!Array.isArray(u.levels) || u.levels.length === 0) throw new Error(`unit "${u.id}" has no levels: it needs one level per band`);
    if (bands === -1) {
      bands = u.levels.length;
      first = u.id;
    } else if (u.levels.length !== bands) {
      throw new Error(
        `unit "${u.id}" has ${u.levels.length} levels but "${first}" has ${bands}: every unit must be measured in the same bands`,
      );
    }
    const levels: readonly unknown[] = u.levels;
    for (let i = 0; i < levels.length; i++) {
      const x = levels[i];
      if (typeof x !== "number" || !Number.isFinite(x)) throw new Error(`unit "${u.id}" has a level that is not a finite number at band ${i} (${String(x)})`);
    }
    for (const key of ["fs", "qts"] as const) {
      const x = u[key];
      if (x !== undefined && x !== null && (typeof x !== "number" || !Number.isFinite(x) || x <= 0)) {
        throw new Error(`unit "${u.id}" has ${key === "fs" ? "Fs" : "Qts"} ${String(x)}: it must be a finite number > 0, or left out`);
      }
    }
  }
  return Math.max(bands, 0);
}

// ---- the cost of a pair -------------------------------------------------------------------------

const has = (x: number | undefined | null): x is number => typeof x === "number";

/** The Fs and Qts terms of the cost (0 where either unit lacks the value or the weight is 0). */
function paramTerms(a: Unit, b: Unit, w: Weights): number {
  let t = 0;
  if (w.fsWeight > 0 && has(a.fs) && has(b.fs)) t += (w.fsWeight * Math.abs(a.fs - b.fs)) / ((a.fs + b.fs) / 2);
  if (w.qtsWeight > 0 && has(a.qts) && has(b.qts)) t += (w.qtsWeight * Math.abs(a.qts - b.qts)) / ((a.qts + b.qts) / 2);
  return t;
}

function costOf(a: Unit, b: Unit, w: Weights): PairCost {
  const la = a.levels;
  const lb = b.levels;
  let sum = 0;
  let maxDiffDb = 0;
  let worstBand = 0;
  for (let i = 0; i < la.length; i++) {
    const d = la[i]! - lb[i]!;
    sum += d * d;
    const ad = Math.abs(d);
    if (ad > maxDiffDb) {
      maxDiffDb = ad;
      worstBand = i;
    }
  }
  return { cost: Math.sqrt(sum / la.length) + paramTerms(a, b, w), maxDiffDb, worstBand };
}

/**
 * The cost of pairing a with b: the RMS of their level differences over the bands,
 * sqrt(mean((aᵢ − bᵢ)²)), plus fsWeight·|ΔFs|/mean(Fs) and qtsWeight·|ΔQts|/mean(Qts) where both
 * units have the value. `maxDiffDb` is the largest |aᵢ − bᵢ| and `worstBand` its band.
 * `opts.limitDb` is not used here (the same options object as for `planPairs` may be passed).
 */
export function pairCost(a: Unit, b: Unit, opts: Partial<MatchOptions> = {}): PairCost {
  const w = checkWeights(opts ?? {});
  checkUnits([a, b]);
  return costOf(a, b, w);
}

const allowed = (maxDiffDb: number, limitDb: number) => maxDiffDb <= limitDb + LIMIT_EPSILON_DB;

// ---- numbers in messages ------------------------------------------------------------------------

const trim = (s: string) => (s.includes(".") && !s.includes("e") ? s.replace(/0+$/, "").replace(/\.$/, "") : s);
/** Two decimals, or two significant digits below 0.01. */
const num = (x: number) => (x === 0 ? "0" : Math.abs(x) >= 0.01 ? trim(x.toFixed(2)) : trim(x.toPrecision(2)));
/** A difference that is over the limit, with enough decimals that it does not read as the limit. */
function over(x: number, limitDb: number): string {
  for (let d = 2; d <= 9; d++) {
    const s = x.toFixed(d);
    if (Number(s) > limitDb) return trim(s);
  }
  return String(x);
}

/**
 * Whether any two of the units may be paired under `opts.limitDb`: exactly when `planPairs` would
 * plan at least one pair (a plan of most pairs has one as soon as one pair is allowed), without
 * working the plan out. The lab's home asks this of every batch on every visit.
 */
export function hasAllowedPair(units: Unit[], opts: MatchOptions): boolean {
  const w = checkOptions(opts);
  checkUnits(units);
  for (let i = 0; i < units.length; i++) {
    for (let j = i + 1; j < units.length; j++) if (allowed(costOf(units[i]!, units[j]!, w).maxDiffDb, opts.limitDb)) return true;
  }
  return false;
}

// ---- the plan -----------------------------------------------------------------------------------

export interface PlanTuning {
  /**
   * How many of each unit's cheapest allowed partners the first matching round considers
   * (default 8); 0 or Infinity: all allowed pairs from the start. Only the time depends on it:
   * every plan is proven optimal against all allowed pairs (see bestMatching).
   */
  candidatesPerUnit?: number;
}

const DEFAULT_CANDIDATES = 8;
/** After a round, besides the violated edges, this many (× n) of the other edges of least slack join. */
const NEAR_TIGHT_PER_UNIT = 2;
/** Rounds before giving up on the sparse start and matching on all allowed pairs at once. */
const MAX_ROUNDS = 6;

/**
 * Integer weights for the matcher. The blossom algorithm compares sums of dual variables with
 * edge weights; with integer weights every one of those numbers is an integer and the
 * comparisons are exact, whereas float costs could make an edge look tight when it is not. Costs
 * are therefore scaled so the largest becomes 2^bits and rounded: the chosen plan is optimal for
 * the rounded costs, hence within 2·pairs·maxCost/2^(bits+1) of the true optimum (about 1.5e-11
 * per pair with bits = 36 and a largest cost of 1 dB). The dual variables stay within a few times
 * n·2^bits, so bits is lowered for very large batches to keep everything below 2^53, where
 * doubles hold integers exactly. Reported costs are recomputed from the real levels.
 */
function weightBits(n: number): number {
  return Math.max(20, Math.min(36, 50 - Math.ceil(Math.log2(n + 2))));
}

interface PairTable {
  /** Allowed pairs i < j in lexicographic order, with their costs. */
  eu: Int32Array;
  ev: Int32Array;
  ec: Float64Array;
  /** For each unit, the other unit with the least largest-band difference (first on a tie), or -1. */
  nearest: Int32Array;
  /** For each unit, its cheapest allowed partner (first on a tie), or -1, and that cost. */
  cheapest: Int32Array;
  cheapestCost: Float64Array;
}

/** All n(n−1)/2 pairs: the only part besides the matcher that grows with n². */
function pairTable(units: readonly Unit[], bands: number, limitDb: number, w: Weights): PairTable {
  const n = units.length;
  const lv = new Float64Array(n * bands);
  units.forEach((u, i) => lv.set(u.levels, i * bands));
  const maxEdges = (n * (n - 1)) / 2;
  let eu = new Int32Array(Math.min(maxEdges, 1024));
  let ev = new Int32Array(eu.length);
  let ec = new Float64Array(eu.length);
  let m = 0;
  const nearest = new Int32Array(n).fill(-1);
  const nearestDiff = new Float64Array(n).fill(Infinity);
  const limit = limitDb + LIMIT_EPSILON_DB;
  for (let i = 0; i < n; i++) {
    const oi = i * bands;
    for (let j = i + 1; j < n; j++) {
      const oj = j * bands;
      let sum = 0;
      let maxDiff = 0;
      for (let t = 0; t < bands; t++) {
        const d = lv[oi + t]! - lv[oj + t]!;
        sum += d * d;
        const ad = d < 0 ? -d : d;
        if (ad > maxDiff) maxDiff = ad;
      }
      if (maxDiff < nearestDiff[i]!) {
        nearestDiff[i] = maxDiff;
        nearest[i] = j;
      }
      if (maxDiff < nearestDiff[j]!) {
        nearestDiff[j] = maxDiff;
        nearest[j] = i;
      }
      if (!(maxDiff <= limit)) continue; // the same test as allowed()
      if (m === eu.length) {
        const size = Math.min(maxEdges, eu.length * 2);
        const a = new Int32Array(size);
        const b = new Int32Array(size);
        const c = new Float64Array(size);
        a.set(eu);
        b.set(ev);
        c.set(ec);
        eu = a;
        ev = b;
        ec = c;
      }
      eu[m] = i;
      ev[m] = j;
      ec[m] = Math.sqrt(sum / bands); // as in costOf
      m++;
    }
  }
  eu = eu.subarray(0, m);
  ev = ev.subarray(0, m);
  ec = ec.subarray(0, m);
  if ((w.fsWeight > 0 && units.some((u) => has(u.fs))) || (w.qtsWeight > 0 && units.some((u) => has(u.qts)))) {
    for (let k = 0; k < m; k++) ec[k]! += paramTerms(units[eu[k]!]!, units[ev[k]!]!, w);
  }
  const cheapest = new Int32Array(n).fill(-1);
  const cheapestCost = new Float64Array(n).fill(Infinity);
  for (let k = 0; k < m; k++) {
    const i = eu[k]!;
    const j = ev[k]!;
    const c = ec[k]!;
    // Edges come in lexicographic order, so the first of equal costs is the earliest partner.
    if (c < cheapestCost[i]!) {
      cheapestCost[i] = c;
      cheapest[i] = j;
    }
    if (c < cheapestCost[j]!) {
      cheapestCost[j] = c;
      cheapest[j] = i;
    }
  }
  return { eu, ev, ec, nearest, cheapest, cheapestCost };
}

/**
 * Edge indices by cost, least first, ties by index: a stable least-significant-digit radix sort
 * on the IEEE-754 bit patterns, which order like the numbers themselves for costs ≥ 0. Gives
 * the same order as sorting with (a, b) => ec[a] − ec[b] || a − b, in a fraction of the time.
 */
function byCost(ec: Float64Array): Int32Array {
  const m = ec.length;
  const bits = new Uint32Array(Float64Array.from(ec).buffer);
  const littleEndian = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
  const lo = littleEndian ? 0 : 1;
  let order = new Int32Array(m);
  for (let k = 0; k < m; k++) order[k] = k;
  let next = new Int32Array(m);
  const count = new Int32Array(65537);
  for (const [word, shift] of [
    [lo, 0],
    [lo, 16],
    [1 - lo, 0],
    [1 - lo, 16],
  ] as const) {
    count.fill(0);
    for (let k = 0; k < m; k++) count[((bits[2 * k + word]! >>> shift) & 0xffff) + 1]!++;
    if (count[((bits[word]! >>> shift) & 0xffff) + 1] === m) continue; // one digit for all: nothing to do
    for (let d = 0; d < 65536; d++) count[d + 1]! += count[d]!;
    for (let q = 0; q < m; q++) {
      const k = order[q]!;
      next[count[(bits[2 * k + word]! >>> shift) & 0xffff]!++] = k;
    }
    [order, next] = [next, order];
  }
  return order;
}

/** An upper bound on the size of any matching: Σ ⌊|C|/2⌋ over the connected components C. */
function cardinalityBound(n: number, eu: Int32Array, ev: Int32Array): number {
  const parent = new Int32Array(n);
  for (let v = 0; v < n; v++) parent[v] = v;
  const find = (v: number): number => {
    while (parent[v] !== v) {
      parent[v] = parent[parent[v]!]!;
      v = parent[v]!;
    }
    return v;
  };
  for (let k = 0; k < eu.length; k++) {
    const a = find(eu[k]!);
    const b = find(ev[k]!);
    if (a !== b) parent[a] = b;
  }
  const size = new Int32Array(n);
  for (let v = 0; v < n; v++) size[find(v)]!++;
  let bound = 0;
  for (let v = 0; v < n; v++) bound += size[v]! >> 1;
  return bound;
}

/**
 * A maximum-cardinality maximum-weight matching on all the edges (eu, ev, ew), usually found
 * much faster than by running the O(n³) matcher on the whole of a dense graph.
 *
 * The matcher's work grows with the edges it scans, and in a dense batch nearly all allowed pairs
 * are far too costly to be in the best plan. So a first round matches on each unit's `candidates`
 * cheapest allowed pairs only. Its result is then proven optimal for the whole graph, or the round
 * is repeated with more edges. Nothing is sampled or left unproven:
 * 1. Size. No matching is larger than Σ ⌊|C|/2⌋ over the connected components C of the whole
 *    graph. A round whose matching reaches that bound has the maximum cardinality. (If it does
 *    not, the bound may be loose or the round's graph too thin: we match on all edges at once.)
 * 2. Weight. The matcher's final dual variables satisfy the optimality conditions on the round's
 *    edges (checked, see solveMatching). Every edge left out is checked against the same duals:
 *    if none has negative slack, the duals are feasible for the whole graph, and complementary
 *    slackness makes the matching the heaviest among all matchings of its size in the whole
 *    graph. Otherwise the edges of negative slack join the next round, with the 2n others of
 *    least slack (they are the likeliest to be needed next); after MAX_ROUNDS, all edges.
 * Weights are integers, so every slack is an exact integer and the proof is exact. Among several
 * optimal plans, which one comes out may depend on the rounds; its cost does not.
 */
function bestMatching(n: number, eu: Int32Array, ev: Int32Array, ew: Float64Array, candidates: number): number[] {
  const m = eu.length;
  const full = () => solveMatching(n, eu, ev, ew, true).mate;
  if (m === 0) return new Array<number>(n).fill(-1);
  if (!(candidates > 0 && candidates < Infinity) || m <= n * candidates) return full();

  // Each vertex's `candidates` heaviest edges (with all edges tied with the last of them).
  const deg = new Int32Array(n + 1);
  for (let k = 0; k < m; k++) {
    deg[eu[k]! + 1]!++;
    deg[ev[k]! + 1]!++;
  }
  for (let v = 0; v < n; v++) deg[v + 1]! += deg[v]!;
  const incident = new Float64Array(2 * m);
  const fill = deg.slice(0, n);
  for (let k = 0; k < m; k++) {
    incident[fill[eu[k]!]!++] = ew[k]!;
    incident[fill[ev[k]!]!++] = ew[k]!;
  }
  const threshold = new Float64Array(n).fill(Infinity);
  for (let v = 0; v < n; v++) {
    const own = incident.subarray(deg[v]!, deg[v + 1]!).sort();
    if (own.length > 0) threshold[v] = own[Math.max(0, own.length - candidates)]!;
  }
  const inRound = new Uint8Array(m);
  for (let k = 0; k < m; k++) if (ew[k]! >= threshold[eu[k]!]! || ew[k]! >= threshold[ev[k]!]!) inRound[k] = 1;

  const bound = cardinalityBound(n, eu, ev);
  for (let round = 0; round < MAX_ROUNDS; round++) {
    let mr = 0;
    for (let k = 0; k < m; k++) mr += inRound[k]!;
    if (mr === m) break;
    const ru = new Int32Array(mr);
    const rv = new Int32Array(mr);
    const rw = new Float64Array(mr);
    const restIndex = new Int32Array(m - mr);
    const xu = new Int32Array(m - mr);
    const xv = new Int32Array(m - mr);
    const xw = new Float64Array(m - mr);
    for (let k = 0, a = 0, b = 0; k < m; k++) {
      if (inRound[k]) {
        ru[a] = eu[k]!;
        rv[a] = ev[k]!;
        rw[a++] = ew[k]!;
      } else {
        restIndex[b] = k;
        xu[b] = eu[k]!;
        xv[b] = ev[k]!;
        xw[b++] = ew[k]!;
      }
    }
    const { mate, violated, slacks } = solveMatching(n, ru, rv, rw, true, { alsoCheck: { eu: xu, ev: xv, ew: xw } });
    let size = 0;
    for (let v = 0; v < n; v++) if (mate[v]! > v) size++;
    if (size < bound) break;
    if (violated.length === 0) return mate;
    for (const x of violated) inRound[restIndex[x]!] = 1;
    const near = Math.min(slacks.length - 1, NEAR_TIGHT_PER_UNIT * n);
    const cut = slacks.slice().sort()[near]!;
    for (let x = 0; x < slacks.length; x++) if (slacks[x]! <= cut) inRound[restIndex[x]!] = 1;
  }
  return full();
}

/**
 * Pair the units of a batch: as many pairs as the limit allows and, among the plans with that
 * many pairs, the least total cost. Also reports what a greedy hand pairing would achieve, and
 * why each unpaired unit was left out.
 *
 * Throws an Error on bad input: an empty or missing id, a duplicate id, units with different
 * numbers of levels, a level that is not a finite number, Fs/Qts ≤ 0, limitDb ≤ 0, a negative weight.
 */
export function planPairs(units: Unit[], opts: MatchOptions): PairPlan {
  return planPairsWith(units, opts, {});
}

/** `planPairs` with a tuning knob that changes only its speed, for tests and the benchmark. */
export function planPairsWith(units: Unit[], opts: MatchOptions, tuning: PlanTuning): PairPlan {
  const w = checkOptions(opts);
  const bands = checkUnits(units);
  const limitDb = opts.limitDb;
  const n = units.length;
  const { eu, ev, ec, nearest, cheapest, cheapestCost } = pairTable(units, bands, limitDb, w);
  const m = eu.length;

  // Least cost among the plans with the most pairs, as a maximum-weight matching.
  //
  // With maxCardinality the matcher returns, among the matchings of maximum cardinality k, one of
  // greatest total weight. Give edge e the weight BIG − c(e). Every matching it chooses from has
  // exactly k edges, so its weight is k·BIG − Σc: the same constant minus the total cost, and the
  // heaviest is exactly the cheapest. BIG = 2^bits + 1 exceeds every scaled cost, so all weights
  // are ≥ 1 (the matcher would also accept weights ≤ 0 in this mode; positive ones keep its
  // dual variables small).
  const bits = weightBits(n);
  let maxCost = 0;
  for (let k = 0; k < m; k++) if (ec[k]! > maxCost) maxCost = ec[k]!;
  const scale = maxCost > 0 ? 2 ** bits / maxCost : 1;
  const big = 2 ** bits + 1;
  const ew = new Float64Array(m);
  for (let k = 0; k < m; k++) ew[k] = big - Math.round(ec[k]! * scale);
  const mate = bestMatching(n, eu, ev, ew, tuning.candidatesPerUnit ?? DEFAULT_CANDIDATES);

  const planned: (PairCost & { i: number; j: number })[] = [];
  for (let i = 0; i < n; i++) {
    const j = mate[i]!;
    if (j > i) planned.push({ i, j, ...costOf(units[i]!, units[j]!, w) });
  }
  planned.sort((x, y) => x.cost - y.cost || x.i - y.i || x.j - y.j);
  let totalCost = 0;
  const pairs: PlannedPair[] = planned.map((p) => {
    totalCost += p.cost;
    return { a: units[p.i]!.id, b: units[p.j]!.id, cost: p.cost, maxDiffDb: p.maxDiffDb, worstBand: p.worstBand };
  });

  // The workshop's way: take the cheapest allowed pair of two unpaired units, again and again
  // (ties by input order: the edge list is in lexicographic order of (i, j)).
  const order = byCost(ec);
  const taken = new Uint8Array(n);
  let greedyTotalCost = 0;
  let greedyPairs = 0;
  for (let q = 0; q < m && 2 * (greedyPairs + 1) <= n; q++) {
    const k = order[q]!;
    const i = eu[k]!;
    const j = ev[k]!;
    if (taken[i] || taken[j]) continue;
    taken[i] = taken[j] = 1;
    greedyPairs++;
    greedyTotalCost += ec[k]!;
  }

  // Why the others are single.
  const bandName = (i: number) => opts.bandLabels?.[i] ?? `band ${i + 1} of ${bands}`;
  const singles: number[] = [];
  for (let i = 0; i < n; i++) if (mate[i] === -1) singles.push(i);
  const single: SingleUnit[] = singles.map((i) => {
    const u = units[i]!;
    let reason: string;
    let closest: SingleUnit["closest"];
    if (n === 1) {
      reason = "odd one out: no other unit in the batch";
    } else if (cheapest[i] === -1) {
      const other = units[nearest[i]!]!;
      const c = costOf(u, other, w);
      closest = { id: other.id, maxDiffDb: c.maxDiffDb, worstBand: c.worstBand };
      reason = `no partner within ${limitDb} dB: the closest, ${other.id}, differs by ${over(c.maxDiffDb, limitDb)} dB at ${bandName(c.worstBand)}`;
    } else {
      const other = units[cheapest[i]!]!;
      const closestAllowed = `the closest allowed was ${other.id} (cost ${num(cheapestCost[i]!)} dB RMS)`;
      // A maximum matching leaves no two single units with an allowed pair between them, so every
      // allowed partner of this unit is in another pair.
      reason =
        n % 2 === 1 && singles.length === 1
          ? `odd one out: with an odd number of units one stays unpaired; ${closestAllowed}`
          : `its possible partners are better used elsewhere; ${closestAllowed}`;
    }
    return closest ? { id: u.id, reason, closest } : { id: u.id, reason };
  });

  return { pairs, single, totalCost, greedyTotalCost, greedyPairs };
}

/**
 * When one unit of a pair fails, the stock units that could replace it: those within the limit
 * against the surviving unit, cheapest first (ties in stock order). Units over the limit are left out.
 */
export function rankReplacements(survivor: Unit, stock: Unit[], opts: MatchOptions): Replacement[] {
  const w = checkOptions(opts);
  if (survivor === null || typeof survivor !== "object") throw new Error("the surviving unit is required");
  checkUnits(stock, survivor);
  const ranked: (Replacement & { index: number })[] = [];
  stock.forEach((u, index) => {
    const c = costOf(survivor, u, w);
    if (allowed(c.maxDiffDb, opts.limitDb)) ranked.push({ id: u.id, cost: c.cost, maxDiffDb: c.maxDiffDb, index });
  });
  ranked.sort((x, y) => x.cost - y.cost || x.index - y.index);
  return ranked.map(({ id, cost, maxDiffDb }) => ({ id, cost, maxDiffDb }));
}
