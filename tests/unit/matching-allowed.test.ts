import { describe, expect, test } from "vitest";
import { hasAllowedPair, planPairs, type Unit } from "@/lib/matching";

// hasAllowedPair answers "would planPairs plan at least one pair?" without planning: checked here
// against planPairs itself on seeded random batches, and on hand-made edges of the limit.

function rng(seed: number) {
  let s = seed >>> 0;
  return () => ((s = (Math.imul(s, 1664525) + 1013904223) >>> 0) / 2 ** 32);
}

function batch(seed: number, n: number, spreadDb: number): Unit[] {
  const r = rng(seed);
  return Array.from({ length: n }, (_, i) => ({ id: `u${i}`, levels: Array.from({ length: 12 }, () => (r() - 0.5) * spreadDb) }));
}

describe("hasAllowedPair", () => {
  const cases = Array.from({ length: 60 }, (_, k) => ({ seed: 1000 + k, n: 2 + (k % 9), spread: 0.5 + (k % 7), limit: [0.25, 0.5, 1, 2][k % 4]! }));
  test.each(cases)("seed $seed: $n units spread over $spread dB, limit $limit dB — the same answer as planPairs", ({ seed, n, spread, limit }) => {
    const units = batch(seed, n, spread);
    expect(hasAllowedPair(units, { limitDb: limit })).toBe(planPairs(units, { limitDb: limit }).pairs.length > 0);
  });

  test.each([
    { what: "a pair exactly at the limit is allowed", levels: [[0, 0], [1, -0.5]], limit: 1, allowed: true },
    { what: "a pair just over it is not", levels: [[0, 0], [1.001, 0]], limit: 1, allowed: false },
    { what: "one unit alone makes no pair", levels: [[0, 0]], limit: 1, allowed: false },
    { what: "the third unit pairs with the first", levels: [[0, 0], [5, 5], [0.2, -0.2]], limit: 0.5, allowed: true },
  ])("$what", ({ levels, limit, allowed }) => {
    const units = levels.map((l, i) => ({ id: `u${i}`, levels: l }));
    expect(hasAllowedPair(units, { limitDb: limit })).toBe(allowed);
    expect(planPairs(units, { limitDb: limit }).pairs.length > 0).toBe(allowed);
  });
});
