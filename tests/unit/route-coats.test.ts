/**
 * What the route records while a cabinet is in it: text readings (the lacquer lot), the abrasive's
 * grit, and the waits between coats (lib/route/rules.ts, lib/route/default-spec.ts,
 * lib/route/spec-rules.ts). The P-grades are the FEPA 43 / ISO 6344-2 and -3 P-scale (from memory);
 * which grit where, the coat windows and the waits are the demo workshop's, common practice, as
 * lib/route/default-spec.ts states them.
 */
import { describe, expect, test } from "vitest";
import { defaultRoute } from "@/lib/route/default-spec";
import { checkReadings, checkStep, gritText, holdsOf, outOfWindowQuestion, parseGrit, position, readingValueText, windowText } from "@/lib/route/rules";
import { stepsSchema } from "@/lib/route/spec-rules";
import type { RouteEntry, Side, StepSpec } from "@/lib/route/types";

const spec = defaultRoute();
const MIN = 60_000;
const stepOf = (key: string) => spec.find((s) => s.key === key)!;
const both: Side[] = ["L", "R"];
/** 09:00 UTC on 1 Dec 2025. */
const T0 = new Date(Date.UTC(2025, 11, 1, 9, 0));
const at = (minutes: number) => new Date(T0.getTime() + minutes * MIN);

let id = 1;
/** Every step up to `key` done, each started 5 h after the one before and recorded 20 min after its start. */
function doneThrough(key: string, overrides: Record<string, { startedAt: Date; recordedAt: Date }> = {}): RouteEntry[] {
  const last = stepOf(key).seq;
  return spec
    .filter((s) => s.seq <= last)
    .map((s) => {
      const o = overrides[s.key];
      const startedAt = o?.startedAt ?? at(-5000 + s.seq * 300);
      return { kind: "step", id: id++, seq: s.seq, cabinets: both, startedAt, recordedAt: o?.recordedAt ?? new Date(startedAt.getTime() + 20 * MIN), readings: {}, outOfWindow: false };
    });
}

describe("text readings: a lacquer lot", () => {
  const lot: StepSpec = { seq: 1, key: "coat-x", name: "Coat", station: "lacquer", readings: [{ key: "lot", label: "Lacquer lot", unit: null, kind: "text", maxLength: 12 }] };
  // Expected values follow the rule in lib/route/rules.ts checkReadings: trimmed, inner spaces made single, kept as written.
  test.each([
    ["  LQ-2611-04 ", { ok: true, values: { lot: "LQ-2611-04" }, outOfWindow: [] }],
    ["lq 2611  04", { ok: true, values: { lot: "lq 2611 04" }, outOfWindow: [] }],
    ["PASS", { ok: true, values: { lot: "PASS" }, outOfWindow: [] }],
    ["", { ok: false, fieldErrors: { lot: ["Enter the lacquer lot."] } }],
    ["   ", { ok: false, fieldErrors: { lot: ["Enter the lacquer lot."] } }],
    ["LQ-2611-04-XYZ", { ok: false, fieldErrors: { lot: ["The lacquer lot is at most 12 characters; you entered 14."] } }],
    ["LQ\u000711", { ok: false, fieldErrors: { lot: ["The lacquer lot holds a character that cannot be printed. Type it again."] } }],
  ])("%j", (typed, expected) => {
    expect(checkReadings(lot, { lot: typed })).toEqual(expected);
  });

  test("a lot is never out of its window, and is shown as written", () => {
    expect(windowText(lot.readings[0]!)).toBe("as written");
    expect(readingValueText(lot.readings[0], "LQ-2611-04")).toBe("LQ-2611-04");
  });

  test("without its own length, a text takes up to 40 characters", () => {
    const open: StepSpec = { ...lot, readings: [{ key: "lot", label: "Lacquer lot", unit: null, kind: "text" }] };
    expect(checkReadings(open, { lot: "L".repeat(40) }).ok).toBe(true);
    expect(checkReadings(open, { lot: "L".repeat(41) }).ok).toBe(false);
  });
});

describe("grit: P-grades of coated abrasives (FEPA 43 / ISO 6344, from memory)", () => {
  test.each([
    ["P240", 240],
    ["p240", 240],
    ["P 320", 320],
    ["180", 180],
    [" P1500 ", 1500],
    ["P250", null], // not on the P-scale: P240, then P280
    ["P2", null],
    ["240.5", null],
    ["fine", null],
    ["", null],
  ])("parseGrit(%j) → %s", (typed, grade) => {
    expect(parseGrit(typed)).toBe(grade);
  });

  const sanding = stepOf("sanding");
  const flatting = stepOf("flatting");
  test.each([
    // The sanding window is P180–P240 and flatting P320–P600 (common practice; default-spec.ts).
    [sanding, "P180", true],
    [sanding, "P240", true],
    [sanding, "P150", false],
    [sanding, "P320", false],
    [flatting, "P320", true],
    [flatting, "P600", true],
    [flatting, "P240", false],
    [flatting, "P800", false],
  ])("%# %s with %s: in window %s", (step, typed, inside) => {
    const r = checkReadings(step, { grit: typed });
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.values.grit).toBe(parseGrit(typed));
      expect(r.outOfWindow.length === 0).toBe(inside);
    }
  });

  test("the window and the question read in P-grades", () => {
    expect(windowText(sanding.readings[0]!)).toBe("P180–P240");
    expect(windowText({ key: "g", label: "G", unit: null, kind: "grit", min: 320 })).toBe("P320 or finer");
    expect(windowText({ key: "g", label: "G", unit: null, kind: "grit", max: 240 })).toBe("P240 or coarser");
    const r = checkReadings(flatting, { grit: "P800" });
    expect(r.ok && outOfWindowQuestion(r.outOfWindow)).toBe("Flatting grit P800 is finer than P320–P600: record it and open a nonconformance?");
    const coarse = checkReadings(sanding, { grit: "120" });
    expect(coarse.ok && outOfWindowQuestion(coarse.outOfWindow)).toBe("Finishing grit P120 is coarser than P180–P240: record it and open a nonconformance?");
    expect(gritText(240)).toBe("P240");
    expect(readingValueText(sanding.readings[0], 240)).toBe("P240");
  });

  test("a grade off the scale is a slip, refused beside its field", () => {
    expect(checkReadings(sanding, { grit: "P250" })).toEqual({
      ok: false,
      fieldErrors: { grit: ["“P250” is not a P-grade of coated abrasives. Enter the grit printed on the back of the paper, like P180, P240 or P320."] },
    });
    expect(checkReadings(sanding, {})).toEqual({ ok: false, fieldErrors: { grit: ["Enter the finishing grit, like P240."] } });
  });
});

describe("coats: lot, oven temperature and film", () => {
  // Windows from default-spec.ts: oven 45–60 °C (stoved coats 1–4 only), wet film 80–120 µm.
  test.each([
    ["coat-2", { coat: "2", lacquerLot: "LQ-1", ovenC: "52", wetFilmUm: "100" }, []],
    ["coat-2", { coat: "2", lacquerLot: "LQ-1", ovenC: "65", wetFilmUm: "100" }, ["ovenC"]],
    ["coat-2", { coat: "2", lacquerLot: "LQ-1", ovenC: "50", wetFilmUm: "1000" }, ["wetFilmUm"]],
    ["coat-2", { coat: "2", lacquerLot: "LQ-1", ovenC: "45", wetFilmUm: "80" }, []],
    ["coat-6", { coat: "6", lacquerLot: "LQ-1", wetFilmUm: "120" }, []],
    ["coat-6", { coat: "6", lacquerLot: "LQ-1", wetFilmUm: "79" }, ["wetFilmUm"]],
  ])("%s %j: out of window %j", (key, typed, out) => {
    const r = checkReadings(stepOf(key), typed);
    expect(r.ok).toBe(true);
    if (r.ok) expect(r.outOfWindow.map((o) => o.key)).toEqual(out);
  });

  test("a stoved coat reads the oven; an air-dried one does not; the coat number still must match", () => {
    expect(stepOf("coat-4").readings.map((r) => r.key)).toEqual(["coat", "lacquerLot", "ovenC", "wetFilmUm"]);
    expect(stepOf("coat-5").readings.map((r) => r.key)).toEqual(["coat", "lacquerLot", "wetFilmUm"]);
    const r = checkReadings(stepOf("coat-3"), { coat: "4", lacquerLot: "", ovenC: "50", wetFilmUm: "100" });
    expect(r).toEqual({ ok: false, fieldErrors: { coat: ["This step is coat 3; you entered 4."], lacquerLot: ["Enter the lacquer lot."] } });
  });
});

describe("the wait between coats", () => {
  // default-spec.ts: stoved coats wait 60 min from the end (stoving 30 min, then cool-down);
  // air-dried coats 30 min from the end (flash-off); the last coat two weeks (curing).
  test.each([
    ["coat-1", 60, "stoving 30 min, then cool-down"],
    ["coat-4", 60, "stoving 30 min, then cool-down"],
    ["coat-5", 30, "flash-off"],
    ["coat-7", 30, "flash-off"],
    ["coat-8", 14 * 24 * 60, "curing, 2 weeks after the last coat"],
  ])("%s waits %i min from when it is recorded (%s)", (key, minutes, label) => {
    expect(stepOf(key).holdAfter).toEqual({ minutes, from: "end", label });
  });

  test("the wait is counted from when the coat was recorded, not when it started", () => {
    // Coat 6 started at 09:00 and was recorded at 09:40: the flash-off ends at 10:10.
    const h = doneThrough("coat-6", { "coat-6": { startedAt: at(0), recordedAt: at(40) } });
    const early = checkStep(spec, h, { seq: stepOf("coat-7").seq, cabinets: both, startedAt: at(69) }, at(69));
    expect(early).toMatchObject({ ok: false, allowedAt: at(70) });
    // The zone's name is the test run's workshop zone (lib/format.ts).
    if (!early.ok) expect(early.reason).toMatch(/^Not before 10:10 on 1 Dec \(.+\): the left and right cabinets are on hold \(flash-off\) until then\.$/);
    expect(checkStep(spec, h, { seq: stepOf("coat-7").seq, cabinets: both, startedAt: at(70) }, at(70))).toEqual({ ok: true });
    expect(holdsOf(spec, h).map((x) => x.until)).toEqual([at(70), at(70)]);
    expect(position(spec, h, both, at(50)).cabinets[0]).toMatchObject({ holdUntil: at(70), holdLabel: "flash-off" });
  });

  test("flatting waits for coat 4's stoving; the first coat after flatting waits for nothing", () => {
    const h = doneThrough("coat-4", { "coat-4": { startedAt: at(0), recordedAt: at(30) } });
    const flat = stepOf("flatting").seq;
    const r = checkStep(spec, h, { seq: flat, cabinets: both, startedAt: at(60) }, at(60));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toContain("(stoving 30 min, then cool-down)");
    const flatted: RouteEntry[] = [...h, { kind: "step", id: id++, seq: flat, cabinets: both, startedAt: at(90), recordedAt: at(120), readings: { grit: 400 }, outOfWindow: false }];
    // Coat 5 may start the minute flatting is recorded: flatting has no wait after it.
    expect(checkStep(spec, flatted, { seq: stepOf("coat-5").seq, cabinets: both, startedAt: at(120) }, at(120))).toEqual({ ok: true });
  });
});

describe("the route editor's rules for the new kinds (lib/route/spec-rules.ts)", () => {
  const step = (r: Record<string, unknown>) => [{ key: "s", name: "Step", station: "lacquer", readings: [{ key: "r", label: "Reading", unit: null, ...r }] }];
  test.each([
    [{ kind: "text" }, true],
    [{ kind: "text", maxLength: 30 }, true],
    [{ kind: "text", min: 1 }, false],
    [{ kind: "text", unit: "mm" }, false],
    [{ kind: "text", maxLength: 0 }, false],
    [{ kind: "grit", min: 180, max: 240 }, true],
    [{ kind: "grit", min: 250 }, false], // P250 is not on the P-scale
    [{ kind: "grit", min: 400, max: 240 }, false],
    [{ kind: "grit", absMax: 2 }, false],
    [{ kind: "number", maxLength: 5 }, false],
  ])("%j accepted: %s", (reading, ok) => {
    expect(stepsSchema.safeParse(step(reading)).success).toBe(ok);
  });

  test("the default route is a well-formed route, unchanged by the editor's canonical form", () => {
    expect(stepsSchema.parse(spec)).toEqual(spec);
  });
});
