/**
 * The owner's line about a repair (lib/certificates/repair-line.ts): which speaker, which part and
 * the day, in plain words. The wording is the product's own; the dates are the workshop's calendar
 * day of the given instant (Pacific/Auckland is UTC+13 in December under its daylight saving time,
 * UTC+12 otherwise: IANA tz database, as carried by Node's Intl).
 */
import { afterEach, describe, expect, test, vi } from "vitest";
import { repairLine, type RepairPart } from "@/lib/certificates/repair-line";

afterEach(() => vi.unstubAllEnvs());

const at = new Date("2026-12-04T10:00:00Z");
const L = (part: string): RepairPart => ({ side: "L", part });
const R = (part: string): RepairPart => ({ side: "R", part });

describe("repairLine", () => {
  test.each<[string, RepairPart[], string]>([
    // The brief's own example of the line (issue 13, § 7; wording of the product).
    ["one tweeter", [R("tweeter")], "Right speaker's tweeter replaced on 4 December 2026 after a service visit"],
    ["a left crossover", [L("crossover")], "Left speaker's crossover replaced on 4 December 2026 after a service visit"],
    ["both tweeters, a matched set", [L("tweeter"), R("tweeter")], "Both speakers' tweeters replaced on 4 December 2026 after a service visit"],
    ["two parts of one speaker, in the order of the model's positions", [R("crossover"), R("tweeter")], "Right speaker's tweeter and crossover replaced on 4 December 2026 after a service visit"],
    ["one part of each speaker", [L("bass"), R("midrange")], "Left speaker's bass unit and right speaker's midrange unit replaced on 4 December 2026 after a service visit"],
    ["two bass units of one speaker", [L("bass"), L("bass")], "Left speaker's two bass units replaced on 4 December 2026 after a service visit"],
    ["both speakers' tweeters and the right crossover", [L("tweeter"), R("tweeter"), R("crossover")], "Both speakers' tweeters and right speaker's crossover replaced on 4 December 2026 after a service visit"],
    ["nothing replaced", [], "Checked and tested again on 4 December 2026 after a service visit, with no part replaced"],
  ])("%s", (_name, parts, expected) => {
    vi.stubEnv("TWINLEAF_TIME_ZONE", "UTC");
    expect(repairLine(parts, at)).toBe(expected);
  });

  test.each<[string, string]>([
    // 2026-12-04T12:30Z is 5 December 01:30 in Auckland (UTC+13, NZDT): IANA tz database.
    ["Pacific/Auckland", "5 December 2026"],
    ["UTC", "4 December 2026"],
  ])("the day is the workshop's calendar day in %s", (zone, day) => {
    vi.stubEnv("TWINLEAF_TIME_ZONE", zone);
    expect(repairLine([R("tweeter")], new Date("2026-12-04T12:30:00Z"))).toBe(`Right speaker's tweeter replaced on ${day} after a service visit`);
  });
});
