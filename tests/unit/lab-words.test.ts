/**
 * The lab's counts and plans in its own words. Expected values follow from the invented inputs
 * of each case (no outside source is involved), except band names: ISO 266 (docs/REFERENCES.md, § One-third-octave bands).
 */
import { describe, expect, test } from "vitest";
import { whyNoPairs } from "@/lib/lab/plan-words";
import { countUnits, UNIT_CLASSES, unitClass, type UnitClass } from "@/lib/lab/unit-counts";
import { planPairs, type Unit } from "@/lib/matching";

describe("where a unit stands", () => {
  test.each<[string, boolean, UnitClass]>([
    ["awaiting_measurement", false, "waiting"],
    ["measured", false, "free"],
    ["in_stock", false, "free"],
    ["reserved", true, "reserved"],
    ["measured", true, "reserved"], // held by an open set whatever its state says
    ["fitted", false, "fitted"],
    ["failed", false, "failed"],
    ["scrapped", false, "other"],
    ["quarantined", false, "other"], // a state this list does not know is counted, never dropped
  ])("%s, in a set: %s → %s", (state, inSet, cls) => {
    expect(unitClass(state, inSet)).toBe(cls);
  });

  test("the classes of a batch add up to its units", () => {
    const groups = [
      { state: "awaiting_measurement", inOpenSet: false, n: 3 },
      { state: "measured", inOpenSet: false, n: 2 },
      { state: "reserved", inOpenSet: true, n: 4 },
      { state: "fitted", inOpenSet: false, n: 6 },
      { state: "failed", inOpenSet: false, n: 1 },
      { state: "scrapped", inOpenSet: false, n: 1 },
    ];
    const counts = countUnits(groups);
    expect(counts).toEqual({ waiting: 3, free: 2, reserved: 4, fitted: 6, failed: 1, other: 1, units: 17 });
    expect(UNIT_CLASSES.reduce((sum, c) => sum + counts[c], 0)).toBe(counts.units);
  });
});

describe("why a plan pairs nothing", () => {
  // Three bands named as ISO 266 names them (docs/REFERENCES.md, § One-third-octave bands), with their unit.
  const labels = ["1.6 kHz", "2 kHz", "2.5 kHz"];
  const u = (id: string, ...levels: number[]): Unit => ({ id, levels });

  test.each<[string, Unit[], number, string | null]>([
    ["two units 1.43 dB apart at 2 kHz, limit 1 dB", [u("A", 0, 0, 0), u("B", 0, 1.43, 0.2)], 1, "No two of the 2 measured units are within the 1.0 dB limit: the closest two, A and B, differ by 1.43 dB at 2 kHz."],
    ["three units, the closest two named", [u("A", 0, 0, 0), u("B", 3, 0, 0), u("C", 0, 0, 0.8)], 0.5, "No two of the 3 measured units are within the 0.5 dB limit: the closest two, A and C, differ by 0.80 dB at 2.5 kHz."],
    ["just over the limit shows enough decimals", [u("A", 0, 0, 0), u("B", 0.5004, 0, 0)], 0.5, "No two of the 2 measured units are within the 0.5 dB limit: the closest two, A and B, differ by 0.5004 dB at 1.6 kHz."],
    ["one unit", [u("A", 0, 0, 0)], 1, "Only 1 measured unit is free: a pair takes two."],
    ["none", [], 1, "No measured units are free to pair."],
    ["a plan with a pair says nothing", [u("A", 0, 0, 0), u("B", 0.1, 0, 0)], 1, null],
  ])("%s", (_name, units, limitDb, text) => {
    const plan = planPairs(units, { limitDb, bandLabels: labels });
    expect(whyNoPairs(plan, { free: units.length, limitDb, noun: "units", bandLabels: labels })).toBe(text);
  });
});
