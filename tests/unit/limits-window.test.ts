import { describe, expect, test } from "vitest";
import { waitMs } from "@/lib/limits/window";

// Worked by hand: the next try is allowed when the oldest of the last `max` tries leaves the window.
describe("waitMs", () => {
  const policy = { windowMs: 60_000, max: 3 };
  const NOW = 1_000_000;
  test.each<[string, number[], number]>([
    ["no tries", [], 0],
    ["fewer than the limit", [NOW - 10_000, NOW - 5_000], 0],
    ["the limit reached: wait for the oldest to leave", [NOW - 50_000, NOW - 10_000, NOW - 5_000], 10_000],
    ["more than the limit: the oldest of the last three decides", [NOW - 59_000, NOW - 40_000, NOW - 10_000, NOW - 5_000], 20_000],
    ["a try exactly a window old no longer counts", [NOW - 60_000, NOW - 10_000, NOW - 5_000], 0],
    ["order does not matter", [NOW - 5_000, NOW - 50_000, NOW - 10_000], 10_000],
  ])("%s", (_label, times, expected) => {
    expect(waitMs(times, policy, NOW)).toBe(expected);
  });
});
