/**
 * The seeded generator the property tests draw their cases from (tests/fixtures/random.ts). If it
 * repeated itself or stuck in a corner, those tests would pass while trying almost nothing.
 */
import { describe, expect, test } from "vitest";
import { gaussian, randomInt, seededRandom } from "../fixtures/random";

const draws = (seed: number, n: number) => {
  const r = seededRandom(seed);
  return Array.from({ length: n }, () => r());
};

describe("seededRandom", () => {
  test.each([1, 7064, 20261201])("seed %i gives the same sequence twice, inside [0, 1)", (seed) => {
    const a = draws(seed, 1000);
    expect(draws(seed, 1000)).toEqual(a);
    expect(a.every((x) => x >= 0 && x < 1)).toBe(true);
    expect(new Set(a).size).toBe(1000);
  });

  test("different seeds give different sequences", () => {
    expect(draws(1, 20)).not.toEqual(draws(2, 20));
  });

  // A uniform variable on [0, 1): each of 10 bins expects n/10 draws; with n = 100,000 the
  // standard deviation of a bin's count is √(n·0.1·0.9) ≈ 95, so ±600 is over six of them.
  test("100,000 draws fill ten equal bins evenly", () => {
    const bins = new Array<number>(10).fill(0);
    for (const x of draws(99, 100_000)) bins[Math.floor(x * 10)]!++;
    for (const count of bins) expect(Math.abs(count - 10_000)).toBeLessThan(600);
  });
});

describe("randomInt and gaussian", () => {
  test.each([
    [0, 1],
    [5, 31],
    [-5, 30],
  ])("randomInt(%i, %i) reaches both ends and nothing outside", (lo, hi) => {
    const r = seededRandom(lo * 100 + hi);
    const seen = new Set(Array.from({ length: 5000 }, () => randomInt(r, lo, hi)));
    expect(Math.min(...seen)).toBe(lo);
    expect(Math.max(...seen)).toBe(hi);
    expect(seen.size).toBe(hi - lo + 1);
  });

  // A standard normal has mean 0 and variance 1; over 50,000 draws the sample mean's standard
  // error is 1/√50,000 ≈ 0.0045, so 0.03 is over six of them.
  test("gaussian draws have mean 0 and variance 1", () => {
    const r = seededRandom(4242);
    const xs = Array.from({ length: 50_000 }, () => gaussian(r));
    const mean = xs.reduce((s, x) => s + x, 0) / xs.length;
    const variance = xs.reduce((s, x) => s + (x - mean) ** 2, 0) / xs.length;
    expect(Math.abs(mean)).toBeLessThan(0.03);
    expect(Math.abs(variance - 1)).toBeLessThan(0.03);
  });
});
