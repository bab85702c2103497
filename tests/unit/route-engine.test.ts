/**
 * One route engine for every routed kind: a lone lacquer cabinet and a trim part with the same
 * records on the same steps are at the same place, held the same way, and refused in the same
 * words but for what each is called. The steps and holds are made up for the test (a 24 h cure
 * after step 2); they stand for no workshop's route.
 */
import { describe, expect, test } from "vitest";
import { groupWords } from "@/lib/route/group-words";
import { routeState, type NcRow, type RecordRow } from "@/lib/route/route-state";
import { checkStep, nextStepNow } from "@/lib/route/rules";
import type { StepSpec } from "@/lib/route/types";

const HOUR = 3_600_000;
const T0 = new Date("2026-12-07T08:00:00Z");
const at = (h: number) => new Date(T0.getTime() + h * HOUR);

const steps: StepSpec[] = [
  { seq: 1, key: "a", name: "Sanding", station: "sanding", readings: [] },
  { seq: 2, key: "b", name: "Last coat", station: "paint", readings: [], holdAfter: { minutes: 24 * 60, from: "end", label: "curing" } },
  { seq: 3, key: "c", name: "Film reading", station: "inspection", readings: [{ key: "filmUm", label: "Film", unit: "µm", kind: "number", min: 60, max: 120 }] },
  { seq: 4, key: "d", name: "Polishing", station: "finish", readings: [] },
];

/** The same story for any one-member group whose member has id `id`. */
function story(id: string, n: number): { records: RecordRow[]; ncs: NcRow[] } {
  const rec = (rid: number, seq: number, h: number, out = false): RecordRow => ({ id: rid, seq, cabinets: [{ id, side: "L" }], startedAt: at(h), recordedAt: at(h), readings: {}, outOfWindow: out });
  const records = [rec(1, 1, 0), rec(2, 2, 1), rec(3, 3, 26, true)].slice(0, n);
  const ncs: NcRow[] =
    n >= 3 ? [{ code: "NC-2612-001", cabinets: [{ id, side: "L" }], openedAt: at(26), openedEventId: 10, disposition: null, dispositionedAt: null, dispositionEventId: null, reworkToSeq: null }] : [];
  return { records, ncs };
}

const groups: ["lone_cabinet" | "trim_part", string][] = [
  ["lone_cabinet", "C-PW2-26-00001-X"],
  ["trim_part", "T-TB3-26-00001-X"],
];

describe("a lone cabinet and a trim part shaped alike", () => {
  test.each([
    // [records so far, when, next step expected, hold until (h after T0) or null, open NCs]
    [0, 0, 1, null, []],
    [1, 0.5, 2, null, []],
    [2, 2, 3, 25, []],
    [2, 25, 3, null, []],
    [3, 27, 4, null, ["NC-2612-001"]],
  ] as const)("after %i records, at T0 + %d h: the same position for both", (n, h, next, holdUntil, open) => {
    const states = groups.map(([, id]) => {
      const { records, ncs } = story(id, n);
      return routeState(steps, records, ncs, [{ side: "L", item: { id } }], at(h)).position;
    });
    expect(states[0]).toEqual(states[1]);
    expect(states[0]!.cabinets[0]!.next?.seq).toBe(next);
    expect(states[0]!.cabinets[0]!.holdUntil).toEqual(holdUntil === null ? null : at(holdUntil));
    expect(states[0]!.openNcs).toEqual(open);
  });

  test.each([
    // [records so far, step asked, when, the refusal in each group's words]
    [2, 3, 2, { lone_cabinet: /^Not before .*: the cabinet is on hold \(curing\)/, trim_part: /^Not before .*: the trim part is on hold \(curing\)/ }],
    [3, 4, 27, { lone_cabinet: /^The cabinet is on hold: nonconformance NC-2612-001 is open\./, trim_part: /^The trim part is on hold: nonconformance NC-2612-001 is open\./ }],
    [1, 3, 2, { lone_cabinet: /^Step 3 \(Film reading\) is not next for the cabinet: its next step is 2, Last coat\.$/, trim_part: /^Step 3 \(Film reading\) is not next for the trim part: its next step is 2, Last coat\.$/ }],
  ] as const)("after %i records, step %i at T0 + %d h is refused alike, in each one's words", (n, seq, h, words) => {
    for (const [kind, id] of groups) {
      const { records, ncs } = story(id, n);
      const { history } = routeState(steps, records, ncs, [{ side: "L", item: { id } }], at(h));
      const check = checkStep(steps, history, { seq, cabinets: ["L"], startedAt: at(h) }, at(h));
      expect(check.ok).toBe(false);
      expect(groupWords(kind, check.ok ? "" : check.reason)).toMatch(words[kind]);
      // The page's "next step now" gives the same refusal as a record would.
      const now = nextStepNow(steps, history, ["L"], at(h));
      if (now.blocked) expect(groupWords(kind, now.blocked.reason)).toMatch(/on hold/);
    }
  });

  test("a pair's words are left as the rules give them", () => {
    expect(groupWords("pair", "The pair is on hold: the left cabinet waits.")).toBe("The pair is on hold: the left cabinet waits.");
  });
});
