/** The service home's ages and stale flag; days counted by hand on the Gregorian calendar. */
import { describe, expect, test } from "vitest";
import { ageInDays, DEFAULT_STALE_DAYS, isStale, parseStaleDays, staleDaysSetting } from "@/lib/service/home";
import { caseCode, normaliseCaseCode } from "@/lib/service/code";
import { compareTraces } from "@/lib/service/trace-diff";

describe("age in days", () => {
  test.each([
    ["2026-12-05", "2026-12-05", 0],
    ["2026-12-04", "2026-12-05", 1],
    ["2026-11-05", "2026-12-05", 30], // November has 30 days
    ["2024-02-28", "2024-03-01", 2], // 2024 is a leap year: 29 February between
    ["2025-02-28", "2025-03-01", 1],
    ["2026-03-28", "2026-03-30", 2], // across the change to summer time in Europe (29 March 2026)
  ])("received %s, today %s: %i days", (received, today, days) => {
    expect(ageInDays(received, today)).toBe(days);
  });
});

describe("stale", () => {
  test.each([
    [14, 14, false], // on the threshold: not yet
    [15, 14, true],
    [3, 2, true],
    [0, 1, false],
  ])("%i days old with a threshold of %i: %s", (age, threshold, stale) => {
    expect(isStale(age, threshold)).toBe(stale);
  });

  test.each([
    [undefined, DEFAULT_STALE_DAYS],
    ["", DEFAULT_STALE_DAYS],
    ["7", 7],
    [" 30 ", 30],
    ["0", DEFAULT_STALE_DAYS],
    ["-3", DEFAULT_STALE_DAYS],
    ["2.5", DEFAULT_STALE_DAYS],
    ["abc", DEFAULT_STALE_DAYS],
    ["99999", DEFAULT_STALE_DAYS],
  ])("the setting %j gives %i days", (env, days) => {
    expect(staleDaysSetting(env)).toBe(days);
  });

  test.each([["10", 10], ["0", null], ["1e3", null], ["3650", 3650], ["3651", null]])("the query %j reads %j", (q, n) => {
    expect(parseStaleDays(q)).toBe(n);
  });
});

describe("case codes", () => {
  test.each([
    ["2026-12-05", 7, "RT2612-0007"],
    ["2027-01-31", 1, "RT2701-0001"],
    ["2026-06-01", 12345, "RT2606-12345"],
  ])("%s, case %i: %s", (day, seq, code) => {
    expect(caseCode(day, seq)).toBe(code);
  });
  test.each([
    ["rt2612-7", "RT2612-0007"],
    [" RT 2612 0007 ", "RT2612-0007"],
    ["RT26120007", "RT2612-0007"],
    ["SP-2612", null],
    ["RT26-1", null],
  ])("typed %j reads %j", (typed, code) => {
    expect(normaliseCaseCode(typed)).toBe(code);
  });
});

describe("as built against now", () => {
  const part = (id: string, holder: string, position: string) => ({ id, identity: id, kind: "drive_unit", holder, position });
  test.each([
    ["nothing changed", [part("a", "S1", "T")], [part("a", "S1", "T")], 0, 0],
    ["a tweeter replaced", [part("a", "S1", "T"), part("b", "S1", "B")], [part("c", "S1", "T"), part("b", "S1", "B")], 1, 1],
    ["a part removed and not replaced", [part("a", "S1", "T")], [], 1, 0],
    ["the same unit moved to another position", [part("a", "S1", "T")], [part("a", "S1", "M")], 1, 1],
  ])("%s", (_n, built, now, removed, fitted) => {
    const c = compareTraces(built, now);
    expect([c.removed, c.fitted]).toEqual([removed, fitted]);
  });
});
