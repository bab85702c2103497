import { describe, expect, test } from "vitest";
import { batchCode, makerLotIdentity } from "@/lib/serials/lots";
import { readWindow } from "@/lib/route/window";

describe("batch codes and maker's lot names", () => {
  // Expected values: the batch code shape the lab has always used (lib/lab/units.ts, TW-2612-01).
  test.each([
    ["tweeter", "2026-12-03", 1, "TW-2612-01"],
    ["midrange", "2025-01-31", 12, "MR-2501-12"],
    ["bass", "2030-07-01", 101, "BS-3007-101"],
  ] as const)("%s received %s, number %i → %s", (partType, day, n, code) => expect(batchCode(partType, day, n)).toBe(code));

  test.each([
    ["Invented maker", "L-1", "Invented maker lot L-1"],
    ["  Spaced maker ", " 77 ", "Spaced maker lot 77"],
  ])("%j and %j → %j", (maker, lot, identity) => expect(makerLotIdentity(maker, lot)).toBe(identity));

  test.each([[" ", "L"], ["M", ""]])("an empty maker or lot (%j, %j) is refused", (m, l) => expect(() => makerLotIdentity(m, l)).toThrow(/both the maker and the lot/));
});

describe("reading a time window (workshop zone UTC in tests)", () => {
  // Expected instants: a whole day from 00:00:00.000 to 23:59:59.999 in the workshop's zone.
  test.each([
    ["2026-03-02", "2026-03-02", "2026-03-02T00:00:00.000Z", "2026-03-02T23:59:59.999Z"],
    ["2026-03-02T14:30Z", "2026-03-02T16:00:00+01:00", "2026-03-02T14:30:00.000Z", "2026-03-02T15:00:00.000Z"],
  ])("%s … %s", (from, to, a, b) => {
    const w = readWindow(from, to);
    if (w.ok) expect([w.from.toISOString(), w.to.toISOString()]).toEqual([a, b]);
    else expect(w.message).toBe("");
  });
  test.each([
    ["2026-03-03", "2026-03-02", "to", /before its start/],
    ["03/02/2026", "2026-03-02", "from", /is not a date/],
    ["2026-03-02", "2026-13-01", "to", /is not a date/],
    ["", "2026-03-02", "from", /is missing/],
  ])("%j … %j is refused on %s", (from, to, field, message) => {
    const w = readWindow(from, to);
    expect(w.ok).toBe(false);
    if (!w.ok) {
      expect(w.field).toBe(field);
      expect(w.message).toMatch(message);
    }
  });
});
