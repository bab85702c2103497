/**
 * Matching benchmark: times `planPairs` (lib/matching) on seeded random batches of 200 and 1,000
 * drive units measured in 31 bands, and compares the plan with the greedy hand pairing.
 * Run with `npm run bench:matching`; never part of `npm test`. The last line printed is one JSON
 * object for the 1,000-unit batch.
 *
 * Each unit's response is a common curve plus an independent deviation ~N(0, 0.3 dB) per band,
 * so under the 1.0 dB limit about half of all pairs are allowed: the graph is dense (≈ 280,000
 * edges for 1,000 units). The timing covers the whole call: pair costs, the matching, the greedy
 * comparison and the reasons.
 *
 * `planPairs` starts the matcher on each unit's cheapest allowed pairs and proves the result
 * optimal against all of them (lib/matching, bestMatching). As a check, each batch is also
 * planned once with all allowed pairs given to the O(n³) matcher at once; its total cost must be
 * the same, and its time is printed beside.
 */
import { performance } from "node:perf_hooks";
import { planPairs, planPairsWith, type Unit } from "@/lib/matching";

const BANDS = 31;
const LIMIT_DB = 1.0;
const SIGMA_DB = 0.3;
const RUNS = 3; // timed runs per size; the median is reported
const TARGET_MS = 2000; // for 1,000 units

/** mulberry32: a small seeded PRNG, uniform in [0, 1). */
function prng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function gaussian(rand: () => number) {
  // Box–Muller; 1 − u keeps the logarithm finite.
  const u = 1 - rand();
  const v = rand();
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
}

function batch(n: number, seed: number): Unit[] {
  const rand = prng(seed);
  // A woofer-like common curve over 31 third-octave bands: roll-off below, a gentle rise, a dip.
  const curve = Array.from({ length: BANDS }, (_, i) => 86 - 12 / (1 + Math.exp(i - 4)) + 1.5 * Math.sin(i / 4) - 2 * Math.exp(-((i - 24) ** 2) / 6));
  return Array.from({ length: n }, (_, k) => ({
    id: `U${String(k + 1).padStart(4, "0")}`,
    levels: curve.map((c) => Math.round((c + SIGMA_DB * gaussian(rand)) * 1000) / 1000),
  }));
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;

let failed = false;
let last: Record<string, number> = {};
for (const [n, seed] of [
  [200, 20240],
  [1000, 100100],
] as const) {
  const units = batch(n, seed);
  const times: number[] = [];
  let plan = planPairs(units, { limitDb: LIMIT_DB });
  for (let r = 0; r < RUNS; r++) {
    const t0 = performance.now();
    plan = planPairs(units, { limitDb: LIMIT_DB });
    times.push(performance.now() - t0);
  }
  const ms = median(times);
  const ok = plan.pairs.length >= plan.greedyPairs && (plan.pairs.length > plan.greedyPairs || plan.totalCost <= plan.greedyTotalCost + 1e-9);
  const t1 = performance.now();
  const all = planPairsWith(units, { limitDb: LIMIT_DB }, { candidatesPerUnit: Infinity });
  const allMs = performance.now() - t1;
  const same = all.pairs.length === plan.pairs.length && Math.abs(all.totalCost - plan.totalCost) < 1e-9;
  if (!ok || !same) failed = true;
  console.log(
    `n=${n}  bands=${BANDS}  limit=${LIMIT_DB} dB  ms=${ms.toFixed(0)} (runs ${times.map((t) => t.toFixed(0)).join(", ")})  ` +
      `pairs=${plan.pairs.length}  greedyPairs=${plan.greedyPairs}  totalCost=${plan.totalCost.toFixed(4)}  greedyTotalCost=${plan.greedyTotalCost.toFixed(4)}  ` +
      `saving=${(100 * (1 - plan.totalCost / plan.greedyTotalCost)).toFixed(1)} %  single=${plan.single.length}  ` +
      `all-pairs matcher: ms=${allMs.toFixed(0)} ${same ? "same optimum" : `FAILED: ${all.pairs.length} pairs, totalCost=${all.totalCost}`}${ok ? "" : "  FAILED: worse than greedy"}`,
  );
  last = { n, ms: Math.round(ms), totalCost: plan.totalCost, greedyTotalCost: plan.greedyTotalCost, pairs: plan.pairs.length, greedyPairs: plan.greedyPairs };
}
console.log(`target: 1,000 units in under ${TARGET_MS} ms: ${last.ms! < TARGET_MS ? "met" : "MISSED"}`);
console.log(JSON.stringify(last));
if (failed) process.exitCode = 1;
