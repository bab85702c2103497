import { describe, expect, test, vi } from "vitest";
import { defaultRoute } from "@/lib/route/default-spec";
import { formatAllowedFrom, formatShopTime } from "@/lib/format";
import { checkReadings, checkStep, holdsOf, nextStepNow, outOfWindowConfirmation, outOfWindowQuestion, outOfWindowText, parseReadingNumber, position, windowText } from "@/lib/route/rules";
import type { RouteEntry, Side, StepSpec } from "@/lib/route/types";

// The spec under test is the demo workshop's default route. Its values (press 135–140 °C for
// 20–25 min, trim ±0.2 mm, brace clamp 2 h + rest 2 h, 8 coats with flatting after the 4th, 2 weeks
// of curing after the last coat) are common practice as the workshop states them: no published source.
const spec = defaultRoute();
const MIN = 60_000;
const HOUR = 60 * MIN;
const DAY = 24 * HOUR;

const seqOf = (key: string) => spec.find((s) => s.key === key)!.seq;
const stepOf = (key: string) => spec.find((s) => s.key === key)!;
const PRESS = seqOf("press");
const TRIM = seqOf("trim");
const BRACE = seqOf("brace");
const SANDING = seqOf("sanding");
const COAT = (n: number) => seqOf(`coat-${n}`);
const FLATTING = seqOf("flatting");
const POLISH = seqOf("machine-polish");
const LAST = spec[spec.length - 1]!.seq;

/** 09:00 UTC on 1 Dec 2025. */
const T0 = new Date(Date.UTC(2025, 11, 1, 9, 0));
const at = (ms: number) => new Date(T0.getTime() + ms);

let nextId = 1;

/**
 * A history that records every step from `from` up to `upTo`, for `cabinets`. Step k (counted
 * from 0) starts at `start + k × every` and is recorded as done `took` later. `times` overrides
 * the start and record times of given seqs (later steps follow on from an override).
 */
function recordThrough(
  upTo: number,
  opts: { from?: number; cabinets?: Side[]; start?: Date; every?: number; took?: number; times?: Record<number, { startedAt: Date; recordedAt: Date }> } = {},
): Extract<RouteEntry, { kind: "step" }>[] {
  const { from = 1, cabinets = ["L", "R"], every = HOUR, took = 30 * MIN, times = {} } = opts;
  let t = (opts.start ?? T0).getTime();
  const out: Extract<RouteEntry, { kind: "step" }>[] = [];
  for (let seq = from; seq <= upTo; seq++) {
    const o = times[seq];
    const startedAt = o?.startedAt ?? new Date(t);
    const recordedAt = o?.recordedAt ?? new Date(startedAt.getTime() + took);
    out.push({ kind: "step", id: nextId++, seq, cabinets: [...cabinets], startedAt, recordedAt, readings: {}, outOfWindow: false });
    t = Math.max(startedAt.getTime() + every, recordedAt.getTime());
  }
  return out;
}

/** The entry that recorded `seq` last. */
const entryFor = (history: RouteEntry[], seq: number) =>
  [...history].reverse().find((e): e is Extract<RouteEntry, { kind: "step" }> => e.kind === "step" && e.seq === seq)!;

/** A moment well after everything in `history`. */
const after = (history: RouteEntry[]) => {
  let max = T0.getTime();
  for (const e of history) max = Math.max(max, e.kind === "step" ? e.recordedAt.getTime() : e.at.getTime());
  return new Date(max + 30 * DAY);
};

const both: Side[] = ["L", "R"];

describe("the default spec as the tests read it", () => {
  test("the seqs used below", () => {
    expect([PRESS, TRIM, BRACE, SANDING, COAT(1), COAT(4), FLATTING, COAT(5), COAT(8), POLISH, LAST]).toEqual([1, 2, 3, 4, 6, 9, 10, 11, 14, 15, 17]);
  });
});

describe("position", () => {
  test("a new pair: nothing done, next is the forming press, no hold", () => {
    const p = position(spec, [], undefined, T0);
    expect(p.finished).toBe(false);
    expect(p.openNcs).toEqual([]);
    expect(p.cabinets.map((c) => c.side)).toEqual(["L", "R"]);
    for (const c of p.cabinets) {
      expect(c.done).toEqual([]);
      expect(c.next?.seq).toBe(PRESS);
      expect(c.holdUntil).toBeNull();
      expect(c.holdLabel).toBeNull();
    }
  });

  test("accepts a RouteSpec as well as a list of steps", () => {
    const h = recordThrough(TRIM);
    const p = position({ id: "r", modelId: "m", version: 1, steps: spec }, h, ["L", "R"], after(h));
    expect(p.cabinets[0]!.next?.seq).toBe(BRACE);
  });

  test("shows the clamp and rest hold while it runs, and not after", () => {
    const h = recordThrough(BRACE);
    const braceStart = entryFor(h, BRACE).startedAt;
    const during = position(spec, h, undefined, new Date(braceStart.getTime() + 3 * HOUR));
    for (const c of during.cabinets) {
      expect(c.next?.seq).toBe(SANDING);
      expect(c.holdUntil).toEqual(new Date(braceStart.getTime() + 4 * HOUR));
      expect(c.holdLabel).toBe("clamp 2 h and rest 2 h");
    }
    const atRelease = position(spec, h, undefined, new Date(braceStart.getTime() + 4 * HOUR));
    expect(atRelease.cabinets[0]!.holdUntil).toBeNull();
    expect(atRelease.cabinets[0]!.holdLabel).toBeNull();
  });

  test("the curing hold counts from when coat 8 was recorded", () => {
    const h = recordThrough(COAT(8));
    const coat8 = entryFor(h, COAT(8));
    const p = position(spec, h, undefined, coat8.recordedAt);
    expect(p.cabinets[1]!.holdUntil).toEqual(new Date(coat8.recordedAt.getTime() + 14 * DAY));
    expect(p.cabinets[1]!.holdLabel).toMatch(/curing/);
  });

  test("finished only after every step, for both cabinets", () => {
    const almost = recordThrough(LAST - 1);
    expect(position(spec, almost, undefined, after(almost)).finished).toBe(false);
    const leftOnly = [...almost, ...recordThrough(LAST, { from: LAST, cabinets: ["L"], start: after(almost) })];
    const p1 = position(spec, leftOnly, undefined, after(leftOnly));
    expect(p1.finished).toBe(false);
    expect(p1.cabinets[0]!.next).toBeNull();
    expect(p1.cabinets[1]!.next?.seq).toBe(LAST);
    const all = [...leftOnly, ...recordThrough(LAST, { from: LAST, cabinets: ["R"], start: after(leftOnly) })];
    const p2 = position(spec, all, undefined, after(all));
    expect(p2.finished).toBe(true);
    for (const c of p2.cabinets) {
      expect(c.next).toBeNull();
      expect(c.done).toEqual(spec.map((s) => s.seq));
      expect(c.holdUntil).toBeNull();
    }
  });

  test("a single-cabinet position when asked for one side", () => {
    const h = recordThrough(LAST, { cabinets: ["L"] });
    const p = position(spec, h, ["L"], after(h));
    expect(p.cabinets).toHaveLength(1);
    expect(p.finished).toBe(true);
  });

  test("a rework back to trimming: the cabinets redo trimming and every later step", () => {
    const h: RouteEntry[] = recordThrough(COAT(2));
    h.push({ kind: "rework", id: nextId++, cabinets: both, toSeq: TRIM, at: after(h) });
    const p = position(spec, h, undefined, after(h));
    for (const c of p.cabinets) {
      expect(c.done).toEqual([PRESS]);
      expect(c.next?.seq).toBe(TRIM);
      expect(c.holdUntil).toBeNull();
    }
    // Trimming is next again and may be recorded; the step after it may not.
    const now = after(h);
    expect(checkStep(spec, h, { seq: TRIM, cabinets: both, startedAt: now }, now)).toEqual({ ok: true });
    const skip = checkStep(spec, h, { seq: BRACE, cabinets: both, startedAt: now }, now);
    expect(skip.ok).toBe(false);
    if (!skip.ok) expect(skip.reason).toContain("next step is 2, Trimming");
    // Doing trimming again moves it on to brace fitting; the old brace entry no longer counts.
    const redone = [...h, ...recordThrough(TRIM, { from: TRIM, start: now })];
    expect(position(spec, redone, undefined, after(redone)).cabinets[0]!.next?.seq).toBe(BRACE);
  });

  test("a rework of one cabinet leaves the other where it is", () => {
    const h: RouteEntry[] = recordThrough(SANDING);
    h.push({ kind: "rework", id: nextId++, cabinets: ["R"], toSeq: TRIM, at: after(h) });
    const p = position(spec, h, undefined, after(h));
    expect(p.cabinets[0]!.next?.seq).toBe(SANDING + 1);
    expect(p.cabinets[1]!.next?.seq).toBe(TRIM);
  });

  test("open nonconformances are listed until closed", () => {
    const h: RouteEntry[] = recordThrough(PRESS);
    h.push({ kind: "nc_opened", id: nextId++, ncId: "NC-0007", cabinets: ["L"], at: at(2 * HOUR) });
    h.push({ kind: "nc_opened", id: nextId++, ncId: "NC-0008", cabinets: ["R"], at: at(2 * HOUR) });
    expect(position(spec, h, undefined, at(3 * HOUR)).openNcs).toEqual(["NC-0007", "NC-0008"]);
    h.push({ kind: "nc_closed", id: nextId++, ncId: "NC-0007", at: at(3 * HOUR) });
    expect(position(spec, h, undefined, at(4 * HOUR)).openNcs).toEqual(["NC-0008"]);
  });
});

describe("checkStep: order of steps", () => {
  test("an unknown seq is refused", () => {
    const r = checkStep(spec, [], { seq: 99, cabinets: both, startedAt: T0 }, T0);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/no step 99/);
  });

  test("no cabinet named is refused", () => {
    const r = checkStep(spec, [], { seq: PRESS, cabinets: [], startedAt: T0 }, T0);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/Choose the cabinet/);
  });

  test("the first step on a new pair is allowed", () => {
    expect(checkStep(spec, [], { seq: PRESS, cabinets: both, startedAt: T0 }, T0)).toEqual({ ok: true });
  });

  test("a step that is not next is refused, naming the cabinet and its next step", () => {
    const h = recordThrough(COAT(1));
    const now = after(h);
    const r = checkStep(spec, h, { seq: COAT(4), cabinets: ["R"], startedAt: now }, now);
    expect(r).toEqual({
      ok: false,
      reason: "Step 9 (Lacquer coat 4, stoved) is not next for the right cabinet: its next step is 7, Lacquer coat 2, stoved.",
    });
  });

  test("a step already done is refused", () => {
    const h = recordThrough(TRIM);
    const now = after(h);
    const r = checkStep(spec, h, { seq: PRESS, cabinets: ["L"], startedAt: now }, now);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toBe("Step 1 (Forming press) is already done for the left cabinet: its next step is 3, Brace fitting.");
  });

  test("coat 8 right after coat 4 is refused, naming flatting", () => {
    const h = recordThrough(COAT(4));
    const now = after(h);
    const r = checkStep(spec, h, { seq: COAT(8), cabinets: both, startedAt: now }, now);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.reason).toContain("Flatting back");
      expect(r.reason).toBe(
        "Step 14 (Lacquer coat 8, air-dried) is not next for the left and right cabinets: their next step is 10, Flatting back.",
      );
    }
    // Coat 5 is not next either: flatting comes first.
    const r5 = checkStep(spec, h, { seq: COAT(5), cabinets: both, startedAt: now }, now);
    expect(r5.ok).toBe(false);
    if (!r5.ok) expect(r5.reason).toContain("10, Flatting back");
    expect(checkStep(spec, h, { seq: FLATTING, cabinets: both, startedAt: now }, now)).toEqual({ ok: true });
  });

  test("one cabinet may do a step alone and the other catches up later", () => {
    const h: RouteEntry[] = recordThrough(SANDING);
    const t1 = after(h);
    expect(checkStep(spec, h, { seq: SANDING + 1, cabinets: ["L"], startedAt: t1 }, t1)).toEqual({ ok: true });
    h.push(...recordThrough(COAT(1), { from: SANDING + 1, cabinets: ["L"], start: t1 }));
    const t2 = after(h);
    const p = position(spec, h, undefined, t2);
    expect(p.cabinets[0]!.next?.seq).toBe(COAT(2));
    expect(p.cabinets[1]!.next?.seq).toBe(SANDING + 1);
    // The right cabinet catches up, step by step, on its own.
    expect(checkStep(spec, h, { seq: SANDING + 1, cabinets: ["R"], startedAt: t2 }, t2)).toEqual({ ok: true });
    h.push(...recordThrough(COAT(1), { from: SANDING + 1, cabinets: ["R"], start: t2 }));
    const t3 = after(h);
    expect(position(spec, h, undefined, t3).cabinets.map((c) => c.next?.seq)).toEqual([COAT(2), COAT(2)]);
    // Once at the same step they may go on together.
    expect(checkStep(spec, h, { seq: COAT(2), cabinets: both, startedAt: t3 }, t3)).toEqual({ ok: true });
  });

  test("both cabinets named while at different steps is refused, naming the one that is not there", () => {
    const h: RouteEntry[] = [...recordThrough(SANDING), ...recordThrough(SANDING + 1, { from: SANDING + 1, cabinets: ["L"], start: at(10 * HOUR) })];
    const now = after(h);
    // Coat 1 is next for the left cabinet only.
    const r = checkStep(spec, h, { seq: COAT(1), cabinets: both, startedAt: now }, now);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.reason).toContain("is not next for the right cabinet: its next step is 5, Hand check after sanding.");
      expect(r.reason).not.toContain("for the left cabinet:");
      expect(r.reason).toContain("Record it for the left cabinet alone");
    }
    // The hand check is next for the right cabinet only.
    const r2 = checkStep(spec, h, { seq: SANDING + 1, cabinets: both, startedAt: now }, now);
    expect(r2.ok).toBe(false);
    if (!r2.ok) expect(r2.reason).toContain("is already done for the left cabinet");
    // Each on its own is fine.
    expect(checkStep(spec, h, { seq: COAT(1), cabinets: ["L"], startedAt: now }, now)).toEqual({ ok: true });
    expect(checkStep(spec, h, { seq: SANDING + 1, cabinets: ["R"], startedAt: now }, now)).toEqual({ ok: true });
  });

  test("nothing is left once a cabinet has finished", () => {
    const h = recordThrough(LAST);
    const now = after(h);
    const r = checkStep(spec, h, { seq: LAST, cabinets: ["R"], startedAt: now }, now);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/finished the route/);
  });
});

describe("checkStep: nonconformance, future start", () => {
  test("an open nonconformance refuses any step until it is closed", () => {
    const h: RouteEntry[] = recordThrough(TRIM);
    h.push({ kind: "nc_opened", id: nextId++, ncId: "NC-0042", cabinets: ["R"], at: after(h) });
    const now = after(h);
    for (const input of [
      { seq: BRACE, cabinets: both },
      { seq: BRACE, cabinets: ["L"] as Side[] },
      { seq: BRACE, cabinets: ["R"] as Side[] },
    ]) {
      expect(checkStep(spec, h, { ...input, startedAt: now }, now)).toEqual({
        ok: false,
        reason: "The pair is on hold: nonconformance NC-0042 is open. Quality must disposition it first.",
      });
    }
    h.push({ kind: "nc_closed", id: nextId++, ncId: "NC-0042", at: now });
    expect(checkStep(spec, h, { seq: BRACE, cabinets: both, startedAt: now }, now)).toEqual({ ok: true });
  });

  test("two open nonconformances are both named", () => {
    const h: RouteEntry[] = [
      { kind: "nc_opened", id: nextId++, ncId: "NC-1", cabinets: ["L"], at: T0 },
      { kind: "nc_opened", id: nextId++, ncId: "NC-2", cabinets: ["R"], at: T0 },
    ];
    const r = checkStep(spec, h, { seq: PRESS, cabinets: both, startedAt: T0 }, T0);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toBe("The pair is on hold: nonconformances NC-1 and NC-2 are open. Quality must disposition them first.");
  });

  test("a start in the future is refused; up to a minute ahead is allowed", () => {
    const now = at(HOUR);
    const r = checkStep(spec, [], { seq: PRESS, cabinets: both, startedAt: new Date(now.getTime() + MIN + 1000) }, now);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toMatch(/in the future/);
    expect(checkStep(spec, [], { seq: PRESS, cabinets: both, startedAt: new Date(now.getTime() + MIN) }, now)).toEqual({ ok: true });
  });

  test("a start that is not a date is refused", () => {
    const r = checkStep(spec, [], { seq: PRESS, cabinets: both, startedAt: new Date(Number.NaN) }, T0);
    expect(r.ok).toBe(false);
  });
});

describe("checkStep: holds", () => {
  // Brace fitting: clamp 2 h, rest 2 h, counted from when the clamp started (common practice).
  const braceStart = new Date(Date.UTC(2025, 11, 3, 10, 5));
  const h = recordThrough(BRACE, { times: { [BRACE]: { startedAt: braceStart, recordedAt: new Date(braceStart.getTime() + 2 * HOUR) } }, start: at(-2 * DAY) });

  test("the step after brace fitting is refused 3 h 59 min after the clamp started", () => {
    const startedAt = new Date(braceStart.getTime() + 3 * HOUR + 59 * MIN);
    const r = checkStep(spec, h, { seq: SANDING, cabinets: ["R"], startedAt }, startedAt);
    expect(r).toEqual({
      ok: false,
      reason: "Not before 14:05 on 3 Dec (UTC): the right cabinet is on hold (clamp 2 h and rest 2 h) until then.",
      allowedAt: new Date(braceStart.getTime() + 4 * HOUR),
    });
    const rBoth = checkStep(spec, h, { seq: SANDING, cabinets: both, startedAt }, startedAt);
    expect(rBoth.ok).toBe(false);
    if (!rBoth.ok) expect(rBoth.reason).toBe("Not before 14:05 on 3 Dec (UTC): the left and right cabinets are on hold (clamp 2 h and rest 2 h) until then.");
  });

  test("and allowed at exactly 4 h", () => {
    const startedAt = new Date(braceStart.getTime() + 4 * HOUR);
    expect(checkStep(spec, h, { seq: SANDING, cabinets: both, startedAt }, startedAt)).toEqual({ ok: true });
  });

  test("a step recorded after the fact is compared with when it started, not with now", () => {
    const startedAt = new Date(braceStart.getTime() + 3 * HOUR + 59 * MIN);
    const now = new Date(braceStart.getTime() + 6 * HOUR);
    // By now the hold has ended, so position() shows none …
    expect(position(spec, h, undefined, now).cabinets[0]!.holdUntil).toBeNull();
    // … but a step that started before it released is still refused.
    const r = checkStep(spec, h, { seq: SANDING, cabinets: both, startedAt }, now);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.allowedAt).toEqual(new Date(braceStart.getTime() + 4 * HOUR));
  });

  test("holdsOf gives the hold whatever the time", () => {
    expect(holdsOf(spec, h).map((x) => [x.side, x.until.toISOString()])).toEqual([
      ["L", "2025-12-03T14:05:00.000Z"],
      ["R", "2025-12-03T14:05:00.000Z"],
    ]);
  });

  // Curing: 2 weeks after the last coat, counted from when coat 8 was recorded (common practice).
  const coats = recordThrough(COAT(8));
  const coat8Done = entryFor(coats, COAT(8)).recordedAt;

  test("polishing is refused at 13 days 23 hours after coat 8 was recorded", () => {
    const startedAt = new Date(coat8Done.getTime() + 13 * DAY + 23 * HOUR);
    const r = checkStep(spec, coats, { seq: POLISH, cabinets: both, startedAt }, startedAt);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.allowedAt).toEqual(new Date(coat8Done.getTime() + 14 * DAY));
      expect(r.reason).toContain(`Not before ${formatShopTime(new Date(coat8Done.getTime() + 14 * DAY), startedAt, { zone: true })}:`);
      expect(r.reason).toContain("curing, 2 weeks after the last coat");
    }
  });

  test("and allowed at 14 days exactly", () => {
    const startedAt = new Date(coat8Done.getTime() + 14 * DAY);
    expect(checkStep(spec, coats, { seq: POLISH, cabinets: both, startedAt }, startedAt)).toEqual({ ok: true });
  });

  test("the curing hold counts from coat 8's record time, not its start", () => {
    const c8Start = new Date(Date.UTC(2025, 11, 10, 8, 0));
    const c8End = new Date(Date.UTC(2025, 11, 10, 9, 30));
    const hist = recordThrough(COAT(8), { times: { [COAT(8)]: { startedAt: c8Start, recordedAt: c8End } } });
    const justAfterStartPlus14d = new Date(c8Start.getTime() + 14 * DAY);
    const r = checkStep(spec, hist, { seq: POLISH, cabinets: both, startedAt: justAfterStartPlus14d }, justAfterStartPlus14d);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toBe("Not before 09:30 on 24 Dec (UTC): the left and right cabinets are on hold (curing, 2 weeks after the last coat) until then.");
  });

  test("cabinets with different holds: allowedAt is the later release", () => {
    const lStart = new Date(Date.UTC(2025, 11, 3, 10, 0));
    const rStart = new Date(Date.UTC(2025, 11, 3, 11, 0));
    const hist: RouteEntry[] = [
      ...recordThrough(TRIM, { start: at(-DAY) }),
      ...recordThrough(BRACE, { from: BRACE, cabinets: ["L"], times: { [BRACE]: { startedAt: lStart, recordedAt: lStart } } }),
      ...recordThrough(BRACE, { from: BRACE, cabinets: ["R"], times: { [BRACE]: { startedAt: rStart, recordedAt: rStart } } }),
    ];
    const startedAt = new Date(Date.UTC(2025, 11, 3, 14, 30));
    const r = checkStep(spec, hist, { seq: SANDING, cabinets: both, startedAt }, startedAt);
    expect(r).toEqual({
      ok: false,
      reason: "Not before 15:00 on 3 Dec (UTC): the right cabinet is on hold (clamp 2 h and rest 2 h) until then.",
      allowedAt: new Date(Date.UTC(2025, 11, 3, 15, 0)),
    });
    // The left cabinet alone may go on.
    expect(checkStep(spec, hist, { seq: SANDING, cabinets: ["L"], startedAt }, startedAt)).toEqual({ ok: true });
  });
});

describe("one minute for a hold: the rule, the refusal and the caution", () => {
  // The workshop's rule (no published source): a hold is allowed from its release rounded up to
  // the whole minute, so 2 h clamp + 2 h rest from 10:18:31 is allowed from 14:19, not 14:18.
  const braceStart = new Date(Date.UTC(2025, 11, 3, 10, 18, 31));
  const h = recordThrough(BRACE, { times: { [BRACE]: { startedAt: braceStart, recordedAt: new Date(braceStart.getTime() + 2 * HOUR) } }, start: at(-2 * DAY) });
  const release = new Date(Date.UTC(2025, 11, 3, 14, 18, 31));
  const allowed = new Date(Date.UTC(2025, 11, 3, 14, 19, 0));

  test.each([
    // [now, why, the step may start, position's hold]
    ["14:18:00", "before the release", false, allowed],
    ["14:18:31", "at the exact release, still inside its minute", false, allowed],
    ["14:18:59", "the last second of that minute", false, allowed],
    ["14:19:00", "the minute shown", true, null],
  ] as const)("at %s (%s) the step after brace fitting may start: %s", (time, _why, ok, hold) => {
    const now = new Date(`2025-12-03T${time}Z`);
    expect(checkStep(spec, h, { seq: SANDING, cabinets: both, startedAt: now }, now).ok).toBe(ok);
    expect(position(spec, h, undefined, now).cabinets[0]!.holdUntil).toEqual(hold);
  });

  test("holdsOf, allowedAt, the refusal and the caution all name 14:19", () => {
    const now = new Date(release.getTime() - 5 * MIN);
    expect(holdsOf(spec, h)[0]!.until).toEqual(allowed);
    const refusal = checkStep(spec, h, { seq: SANDING, cabinets: both, startedAt: now }, now);
    expect(refusal).toEqual({ ok: false, reason: "Not before 14:19 on 3 Dec (UTC): the left and right cabinets are on hold (clamp 2 h and rest 2 h) until then.", allowedAt: allowed });
    const caution = nextStepNow(spec, h, both, now);
    expect(caution.step?.seq).toBe(SANDING);
    expect(caution.ready).toEqual([]);
    expect(caution.blocked).toEqual({ sides: both, reason: refusal.ok ? "" : refusal.reason, allowedAt: allowed });
    // The page's own line for the hold says the same minute.
    expect(formatAllowedFrom(position(spec, h, undefined, now).cabinets[0]!.holdUntil!, now)).toBe("14:19 on 3 Dec (UTC)");
  });

  test("in the workshop's zone: the same hold reads 15:19 in Berlin (CET, UTC+1 in December)", () => {
    // Offsets per the IANA time zone database: Europe/Berlin is UTC+1 in winter.
    vi.stubEnv("TWINLEAF_TIME_ZONE", "Europe/Berlin");
    try {
      const now = new Date(release.getTime() - 5 * MIN);
      const refusal = checkStep(spec, h, { seq: SANDING, cabinets: both, startedAt: now }, now);
      expect(refusal.ok ? "" : refusal.reason).toMatch(/^Not before 15:19 on 3 Dec \(Europe\/Berlin\):/);
      expect(nextStepNow(spec, h, both, now).blocked?.reason).toBe(refusal.ok ? "" : refusal.reason);
    } finally {
      vi.unstubAllEnvs();
    }
  });

  test("one cabinet held and one ready: the ready one is offered, the held one named with the refusal's words", () => {
    const lStart = new Date(Date.UTC(2025, 11, 3, 10, 0));
    const rStart = new Date(Date.UTC(2025, 11, 3, 11, 0, 30));
    const hist: RouteEntry[] = [
      ...recordThrough(TRIM, { start: at(-DAY) }),
      ...recordThrough(BRACE, { from: BRACE, cabinets: ["L"], times: { [BRACE]: { startedAt: lStart, recordedAt: lStart } } }),
      ...recordThrough(BRACE, { from: BRACE, cabinets: ["R"], times: { [BRACE]: { startedAt: rStart, recordedAt: rStart } } }),
    ];
    const now = new Date(Date.UTC(2025, 11, 3, 14, 30));
    const r = nextStepNow(spec, hist, both, now);
    expect(r.ready).toEqual(["L"]);
    const refusal = checkStep(spec, hist, { seq: SANDING, cabinets: both, startedAt: now }, now);
    expect(r.blocked?.reason).toBe(refusal.ok ? "" : refusal.reason);
    expect(r.blocked?.reason).toBe("Not before 15:01 on 3 Dec (UTC): the right cabinet is on hold (clamp 2 h and rest 2 h) until then.");
  });

  test("an open nonconformance: nothing is offered, and the page says why and until when", () => {
    const hist: RouteEntry[] = [...recordThrough(TRIM), { kind: "nc_opened", id: nextId++, ncId: "NC-2512-004", cabinets: both, at: at(3 * HOUR) }];
    const now = at(4 * HOUR);
    const r = nextStepNow(spec, hist, both, now);
    expect(r.ready).toEqual([]);
    expect(r.blocked?.reason).toBe("The pair is on hold: nonconformance NC-2512-004 is open. Quality must disposition it first.");
  });

  test("a finished route offers nothing", () => {
    const done = recordThrough(LAST);
    expect(nextStepNow(spec, done, both, after(done))).toEqual({ step: null, ready: [], blocked: null });
  });
});

describe("asking before an out-of-window reading is recorded", () => {
  const press = stepOf("press");
  test.each([
    // Windows from the default route (common practice); the words are Twinleaf's.
    [{ platenC: "141", minutes: "22" }, "Platen temperature 141 °C is outside 135–140 °C: record it and open a nonconformance?", "platenC=141"],
    [{ platenC: "134.5", minutes: "26" }, "Platen temperature 134.5 °C is outside 135–140 °C and time in the press 26 min is outside 20–25 min: record them and open a nonconformance?", "minutes=26&platenC=134.5"],
  ])("%j", (readings, question, confirmation) => {
    const r = checkReadings(press, readings);
    if (!r.ok) throw new Error("expected readings");
    expect(outOfWindowQuestion(r.outOfWindow)).toBe(question);
    expect(outOfWindowConfirmation(r.outOfWindow)).toBe(confirmation);
  });

  test.each([
    [stepOf("brace"), { clampMinutes: "100" }, "Time under clamp 100 min is below the minimum of 120 min"],
    [stepOf("trim"), { deviationMm: "0.3" }, "Trim deviation 0.3 mm is outside ±0.2 mm"],
    [stepOf("check-sanding"), { pass: false }, "Inspector's check: surface fit for lacquer: not passed"],
  ] as const)("%#: %s", (step, readings, text) => {
    const r = checkReadings(step, readings);
    if (!r.ok) throw new Error("expected readings");
    expect(outOfWindowText(r.outOfWindow[0]!)).toBe(text);
  });

  test("a changed value is a different confirmation", () => {
    const a = checkReadings(press, { platenC: "141", minutes: "22" });
    const b = checkReadings(press, { platenC: "142", minutes: "22" });
    if (!a.ok || !b.ok) throw new Error("expected readings");
    expect(outOfWindowConfirmation(a.outOfWindow)).not.toBe(outOfWindowConfirmation(b.outOfWindow));
  });
});

describe("checkReadings", () => {
  const press = stepOf("press");
  const trim = stepOf("trim");
  const brace = stepOf("brace");
  const coat5 = stepOf("coat-5");
  const checkSanding = stepOf("check-sanding");

  const outKeys = (step: StepSpec, raw: Record<string, string | boolean | undefined>) => {
    const r = checkReadings(step, raw);
    if (!r.ok) throw new Error(JSON.stringify(r.fieldErrors));
    return r.outOfWindow.map((o) => o.key);
  };

  // Press 135–140 °C for 20–25 min (common practice): edges are in.
  test.each([
    ["134", true],
    ["135", false],
    ["137,5", false],
    ["140", false],
    ["141", true],
  ])("platen %s °C out of window: %s", (value, out) => {
    expect(outKeys(press, { platenC: value, minutes: "22" }).includes("platenC")).toBe(out);
  });

  test.each([
    ["19", true],
    ["20", false],
    ["25", false],
    ["26", true],
  ])("%s minutes in the press out of window: %s", (value, out) => {
    expect(outKeys(press, { platenC: "137", minutes: value }).includes("minutes")).toBe(out);
  });

  // Trim ±0.2 mm (common practice): edges are in.
  test.each([
    ["0.21", true],
    ["-0.21", true],
    ["0.20", false],
    ["-0.20", false],
    ["0,2", false],
    ["−0,2", false],
    ["0.2000000001", false],
    ["0", false],
  ])("trim deviation %s mm out of window: %s", (value, out) => {
    expect(outKeys(trim, { deviationMm: value }).includes("deviationMm")).toBe(out);
  });

  test("an out-of-window reading is returned, recorded, with its window text", () => {
    const r = checkReadings(press, { platenC: "141", minutes: "19" });
    expect(r).toEqual({
      ok: true,
      values: { platenC: 141, minutes: 19 },
      outOfWindow: [
        { key: "platenC", label: "Platen temperature", value: 141, unit: "°C", window: "135–140 °C", miss: "outside 135–140 °C" },
        { key: "minutes", label: "Time in the press", value: 19, unit: "min", window: "20–25 min", miss: "outside 20–25 min" },
      ],
    });
    const t = checkReadings(trim, { deviationMm: "-0,21" });
    expect(t).toEqual({ ok: true, values: { deviationMm: -0.21 }, outOfWindow: [{ key: "deviationMm", label: "Trim deviation", value: -0.21, unit: "mm", window: "±0.2 mm", miss: "outside ±0.2 mm" }] });
  });

  test("brace clamp time: at least 120 min (common practice)", () => {
    expect(outKeys(brace, { clampMinutes: "120" })).toEqual([]);
    const r = checkReadings(brace, { clampMinutes: "119" });
    expect(r.ok && r.outOfWindow[0]?.window).toBe("at least 120 min");
    expect(r.ok && r.outOfWindow[0]?.miss).toBe("below the minimum of 120 min");
  });

  test("every reading is required", () => {
    const r = checkReadings(press, { platenC: "137" });
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(Object.keys(r.fieldErrors)).toEqual(["minutes"]);
      expect(r.fieldErrors.minutes![0]).toBe("Enter the time in the press in min.");
    }
    const blank = checkReadings(press, { platenC: "  ", minutes: "" });
    expect(blank.ok).toBe(false);
    if (!blank.ok) expect(Object.keys(blank.fieldErrors).sort()).toEqual(["minutes", "platenC"]);
  });

  test("a reading that is not a number is a field error", () => {
    for (const bad of ["abc", "13 7", "1e2", "137..5", "1.2.3", "--1", "Infinity", "NaN"]) {
      const r = checkReadings(press, { platenC: bad, minutes: "22" });
      expect(r.ok, bad).toBe(false);
      if (!r.ok) expect(r.fieldErrors.platenC?.[0]).toMatch(/is not a number/);
    }
    const b = checkReadings(press, { platenC: true, minutes: "22" });
    expect(b.ok).toBe(false);
  });

  test("a coat number that does not match the step is a field error, not a reading", () => {
    const rest = { lacquerLot: "LQ-2611-04", wetFilmUm: "100" };
    const r = checkReadings(coat5, { coat: "4", ...rest });
    expect(r).toEqual({ ok: false, fieldErrors: { coat: ["This step is coat 5; you entered 4."] } });
    expect(checkReadings(coat5, { coat: "5", ...rest })).toEqual({ ok: true, values: { coat: 5, lacquerLot: "LQ-2611-04", wetFilmUm: 100 }, outOfWindow: [] });
  });

  test("an inspector's check: pass is in, fail is out of window (window 'pass'), no answer is an error", () => {
    expect(checkReadings(checkSanding, { pass: true })).toEqual({ ok: true, values: { pass: true }, outOfWindow: [] });
    expect(checkReadings(checkSanding, { pass: "pass" })).toEqual({ ok: true, values: { pass: true }, outOfWindow: [] });
    const fail = checkReadings(checkSanding, { pass: false });
    expect(fail).toEqual({
      ok: true,
      values: { pass: false },
      outOfWindow: [{ key: "pass", label: "Inspector's check: surface fit for lacquer", value: false, unit: null, window: "pass", miss: "not passed" }],
    });
    expect(checkReadings(checkSanding, { pass: "fail" }).ok).toBe(true);
    expect(checkReadings(checkSanding, {}).ok).toBe(false);
    expect(checkReadings(checkSanding, { pass: "maybe" }).ok).toBe(false);
  });

  test("a step with no readings has nothing to check; extra fields are ignored", () => {
    expect(checkReadings(stepOf("hand-finish"), { stray: "x" })).toEqual({ ok: true, values: {}, outOfWindow: [] });
  });
});

describe("windowText", () => {
  test("each kind of window", () => {
    expect(windowText(stepOf("press").readings[0]!)).toBe("135–140 °C");
    expect(windowText(stepOf("press").readings[1]!)).toBe("20–25 min");
    expect(windowText(stepOf("trim").readings[0]!)).toBe("±0.2 mm");
    expect(windowText(stepOf("brace").readings[0]!)).toBe("at least 120 min");
    expect(windowText(stepOf("check-polish").readings[0]!)).toBe("pass");
    expect(windowText(stepOf("coat-3").readings[0]!)).toBe("exactly 3");
    expect(windowText({ key: "x", label: "X", unit: "min", kind: "number", max: 25 })).toBe("at most 25 min");
  });
});

describe("parseReadingNumber", () => {
  test("decimal point or comma, a typographic minus; nothing else", () => {
    expect(parseReadingNumber("137")).toBe(137);
    expect(parseReadingNumber(" 137,5 ")).toBe(137.5);
    expect(parseReadingNumber("-0.15")).toBe(-0.15);
    expect(parseReadingNumber("−0,15")).toBe(-0.15);
    expect(parseReadingNumber(",5")).toBe(0.5);
    expect(parseReadingNumber("1,000.5")).toBeNull();
    expect(parseReadingNumber("")).toBeNull();
  });
});
