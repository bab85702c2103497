import { describe, expect, test } from "vitest";
import { planFlitch, planYield, type PlanLeaf, type PlanSpec } from "@/lib/veneer/plan";
import { seededRandom as rng } from "../fixtures/random";

const leaf = (seq: number, o: Partial<PlanLeaf> = {}): PlanLeaf => ({ seq, lengthMm: 1000, widthMm: 200, usable: true, ...o });
const flitch = (n: number, bad: number[] = []) => Array.from({ length: n }, (_, i) => leaf(i + 1, { usable: !bad.includes(i + 1) }));
const spec = (o: Partial<PlanSpec> = {}): PlanSpec => ({ leavesPerFace: 2, minLengthMm: 900, minWidthMm: 150, reservePerPair: 0, ...o });

// Book match as defined by the Architectural Woodwork Standards §1.2.19 (every other leaf turned
// over, leaves taken in sequence): the left face takes the odd positions of a run, the right the even.
describe("planFlitch: worked cases", () => {
  test.each([
    ["8 good leaves, 2 per face: two pairs in slicing order", flitch(8), spec(), { pairs: 2, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }, { left: [5, 7], right: [6, 8], reserve: [] }], leftover: [] }],
    ["a defect at leaf 3 breaks the first run", flitch(9, [3]), spec(), { pairs: 1, runs: [{ left: [4, 6], right: [5, 7], reserve: [] }], leftover: [1, 2, 3, 8, 9] }],
    ["a reserve of 1 follows each run", flitch(10), spec({ reservePerPair: 1 }), { pairs: 2, runs: [{ left: [1, 3], right: [2, 4], reserve: [5] }, { left: [6, 8], right: [7, 9], reserve: [10] }], leftover: [] }],
    ["a run without room for its reserve is not a pair", flitch(4), spec({ reservePerPair: 1 }), { pairs: 0, runs: [], leftover: [1, 2, 3, 4] }],
    ["3 leaves per face take 6 in a row", flitch(7), spec({ leavesPerFace: 3 }), { pairs: 1, runs: [{ left: [1, 3, 5], right: [2, 4, 6], reserve: [] }], leftover: [7] }],
  ])("%s", (_label, leaves, s, expected) => {
    expect(planFlitch(leaves, s)).toEqual(expected);
  });

  test("a short or narrow leaf breaks a run like a defect", () => {
    const leaves = flitch(8).map((l) => (l.seq === 2 ? { ...l, lengthMm: 800 } : l.seq === 7 ? { ...l, widthMm: 140 } : l));
    expect(planFlitch(leaves, spec())).toEqual({ pairs: 1, runs: [{ left: [3, 5], right: [4, 6], reserve: [] }], leftover: [1, 2, 7, 8] });
  });

  test("a gap in the slicing order (a leaf never recorded) breaks a run", () => {
    const leaves = [1, 2, 3, 5, 6, 7, 8].map((s) => leaf(s));
    expect(planFlitch(leaves, spec()).runs).toEqual([{ left: [5, 7], right: [6, 8], reserve: [] }]);
  });

  test("the order the leaves are given in does not matter", () => {
    const leaves = flitch(9, [3]);
    expect(planFlitch([...leaves].reverse(), spec())).toEqual(planFlitch(leaves, spec()));
  });

  test("bad specs and duplicate leaves are refused", () => {
    expect(() => planFlitch(flitch(4), spec({ leavesPerFace: 0 }))).toThrow(/leavesPerFace/);
    expect(() => planFlitch([leaf(1), leaf(1)], spec())).toThrow(/twice/);
  });

  test("yield counts leaves and area", () => {
    const leaves = flitch(10);
    const y = planYield(leaves, planFlitch(leaves, spec({ reservePerPair: 1 })));
    expect(y).toEqual({ leavesUsed: 10, faceLeaves: 8, areaShare: 1 });
  });
});

/**
 * An independent oracle: try every set of non-overlapping blocks of (2k + r) consecutive good
 * leaves on small random flitches, keep the most pairs and, among those, the plan whose used
 * leaves come earliest (lexicographically smallest sorted list of used seqs).
 */
function bruteForce(leaves: PlanLeaf[], s: PlanSpec): { pairs: number; used: number[] } {
  const block = 2 * s.leavesPerFace + s.reservePerPair;
  const good = leaves.map((l) => l.usable && l.lengthMm >= s.minLengthMm && l.widthMm >= s.minWidthMm);
  const n = leaves.length;
  let best: { pairs: number; used: number[] } = { pairs: 0, used: [] };
  const lexLess = (a: number[], b: number[]) => {
    for (let i = 0; i < Math.min(a.length, b.length); i++) if (a[i] !== b[i]) return a[i]! < b[i]!;
    return a.length < b.length;
  };
  const go = (from: number, starts: number[]) => {
    const used = starts.flatMap((st) => Array.from({ length: block }, (_, j) => leaves[st + j]!.seq));
    if (starts.length > best.pairs || (starts.length === best.pairs && lexLess(used, best.used))) best = { pairs: starts.length, used };
    for (let st = from; st + block <= n; st++) {
      let ok = true;
      for (let j = 0; j < block; j++) if (!good[st + j] || (j > 0 && leaves[st + j]!.seq !== leaves[st + j - 1]!.seq + 1)) ok = false;
      if (ok) go(st + block, [...starts, st]);
    }
  };
  go(0, []);
  return best;
}

test("on 500 random small flitches the plan has the most pairs and the earliest leaves (brute force)", () => {
  const r = rng(20261201);
  for (let t = 0; t < 500; t++) {
    const n = 4 + Math.floor(r() * 12);
    const leaves = Array.from({ length: n }, (_, i) => leaf(i + 1, { usable: r() > 0.15, lengthMm: r() > 0.1 ? 1000 : 850 }));
    const s = spec({ leavesPerFace: 1 + Math.floor(r() * 2), reservePerPair: Math.floor(r() * 2) });
    const plan = planFlitch(leaves, s);
    const oracle = bruteForce(leaves, s);
    expect(plan.pairs).toBe(oracle.pairs);
    expect(plan.runs.flatMap((x) => [...x.left, ...x.right, ...x.reserve]).sort((a, b) => a - b)).toEqual(oracle.used);
  }
});
