/**
 * The route editor's draft (app/(workshop)/admin/routes/[model]/edit/draft.ts): the edits it
 * offers, the JSON it sends, and the server's errors placed back on the fields they are about.
 * The server's side is the real one: the form's schema (app/(workshop)/admin/routes/schemas.ts)
 * and the spec rules (lib/route/spec-rules.ts). Expected values come from those definitions and
 * from the workshop's usual route (lib/route/default-spec.ts, common practice).
 */
import { describe, expect, test } from "vitest";
import { z } from "zod";
import * as draft from "@/app/(workshop)/admin/routes/[model]/edit/draft";
import { saveRouteSchema } from "@/app/(workshop)/admin/routes/schemas";
import { defaultRoute } from "@/lib/route/default-spec";
import { holdText, stepsSchema } from "@/lib/route/spec-rules";
import type { StepSpec } from "@/lib/route/types";

const usual = defaultRoute();
const uids = (steps: draft.StepDraft[]) => steps.map((s) => s.uid);

/** What the server answers for a draft, as guardedAction hands it to the form. */
function serverErrors(steps: draft.StepDraft[], note = "Tighter trim for the new press") {
  const parsed = saveRouteSchema.safeParse({ modelId: "m1", baseVersion: "1", note, steps: JSON.stringify(draft.toSpec(steps)) });
  return parsed.success ? {} : (z.flattenError(parsed.error).fieldErrors as Record<string, string[]>);
}

describe("from a saved route and back", () => {
  test("the usual route, drafted and sent untouched, is the same route to the server", () => {
    const sent = stepsSchema.parse(draft.toSpec(draft.draftOf(usual)));
    expect(sent).toEqual(usual);
  });

  test("ids come from places, so the server and the browser agree on them", () => {
    const d = draft.draftOf(usual.slice(0, 2));
    expect(uids(d)).toEqual(["s0", "s1"]);
    expect(d[0]!.readings.map((r) => r.uid)).toEqual(["s0r0", "s0r1"]);
    expect(uids(draft.draftOf(usual.slice(0, 2), "a"))).toEqual(["a0", "a1"]);
  });

  // A hold is shown in the largest unit that divides it (lib/route/types.ts: minutes).
  test.each([
    [4 * 60, "4", "h", "brace: clamp 2 h and rest 2 h (default-spec)"],
    [14 * 24 * 60, "14", "d", "curing, 2 weeks (default-spec)"],
    [90, "90", "min", "not a whole number of hours"],
    [undefined, "", "h", "no hold: hours offered"],
  ] as [number | undefined, string, string, string][])("a hold of %s minutes is drafted as %s %s (%s)", (minutes, amount, unit) => {
    const step: StepSpec = { ...usual[2]!, holdAfter: minutes === undefined ? undefined : { minutes, from: "start", label: "wait" } };
    const d = draft.stepDraft(step, "x");
    expect([d.holdAmount, d.holdUnit]).toEqual([amount, unit]);
  });
});

describe("editing", () => {
  const three = () => draft.draftOf(usual.slice(0, 3));

  test.each([
    [0, ["new", "s0", "s1", "s2"]],
    [1, ["s0", "new", "s1", "s2"]],
    [3, ["s0", "s1", "s2", "new"]],
    [99, ["s0", "s1", "s2", "new"]],
    [-1, ["new", "s0", "s1", "s2"]],
  ])("insertStep at %i puts the blank step there", (at, expected) => {
    expect(uids(draft.insertStep(three(), at, draft.stepDraft(undefined, "new")))).toEqual(expected);
  });

  test.each([
    [0, -1, ["s0", "s1", "s2"]],
    [0, 1, ["s1", "s0", "s2"]],
    [2, -1, ["s0", "s2", "s1"]],
    [2, 1, ["s0", "s1", "s2"]],
  ] as const)("moveStep %i by %i", (index, by, expected) => {
    expect(uids(draft.moveStep(three(), index, by))).toEqual(expected);
  });

  test("removing, adding, moving and changing readings touch only their own step and leave the old list alone", () => {
    const before = three();
    const snapshot = JSON.stringify(before);
    let d = draft.addReading(before, "s1", draft.readingDraft(undefined, "r-new"));
    d = draft.moveReading(d, "s0", 0, 1);
    d = draft.updateReading(d, "s0", "s0r1", { max: "139" });
    d = draft.removeReading(d, "s2", "s2r0");
    d = draft.updateStep(d, "s2", { name: "Brace fitting, long" });
    d = draft.removeStep(d, "s1");
    expect(JSON.stringify(before)).toBe(snapshot);
    expect(uids(d)).toEqual(["s0", "s2"]);
    expect(d[0]!.readings.map((r) => [r.uid, r.max])).toEqual([
      ["s0r1", "139"], // time in the press, its max changed (was 25)
      ["s0r0", "140"], // platen temperature, untouched
    ]);
    expect(d[1]).toMatchObject({ name: "Brace fitting, long", readings: [] });
  });
});

describe("what is sent", () => {
  // Typed numbers as a workshop types them; anything that is not a number goes as typed, so the
  // server refuses it beside its field (spec-rules: "Enter a number, like 12 or 12.5").
  test.each([
    ["12", 12],
    ["12.5", 12.5],
    ["0,2", 0.2],
    ["\u22120.15", -0.15],
    [".5", 0.5],
    ["  ", undefined],
    ["12a", "12a"],
    ["1e3", "1e3"],
  ])("numberOrText(%j) is %j", (text, expected) => {
    expect(draft.numberOrText(text)).toBe(expected);
  });

  // Keys made from names must pass the spec rules' key patterns (STEP_KEY_RE, READING_KEY_RE).
  test.each([
    ["Lacquer coat 9, stoved", "lacquer-coat-9-stoved", "lacquerCoat9Stoved"],
    ["Ébénisterie  finale", "ebenisterie-finale", "ebenisterieFinale"],
    ["2nd coat", "2nd-coat", "ndCoat"],
    ["!!!", "", ""],
  ])("%j makes the step key %j and the reading key %j", (text, stepKey, readingKey) => {
    expect(draft.stepKeyFrom(text)).toBe(stepKey);
    expect(draft.readingKeyFrom(text)).toBe(readingKey);
  });

  test("a blank key is made from the name, a check sends no unit or limits, a hold goes in minutes, a blank note is left out", () => {
    const step: draft.StepDraft = {
      ...draft.stepDraft(undefined, "x"),
      name: "Edge check",
      station: "inspection",
      holdAmount: "0.1",
      holdUnit: "h",
      holdLabel: "settle",
      note: "  ",
      readings: [{ ...draft.readingDraft(undefined, "r"), label: "Edges square", kind: "check", unit: "mm", min: "1" }],
    };
    expect(draft.toSpec([step])).toEqual([
      {
        key: "edge-check",
        name: "Edge check",
        station: "inspection",
        readings: [{ key: "edgesSquare", label: "Edges square", unit: null, kind: "check" }],
        // 0.1 h is 6 minutes exactly, not 6.000000000000001.
        holdAfter: { from: "end", label: "settle", minutes: 6 },
      },
    ]);
  });

  test.each([
    [{ min: "135", max: "140", unit: "°C" }, "135–140 °C"],
    [{ absMax: "0,2", unit: "mm" }, "±0.2 mm"],
    [{ equals: "8" }, "exactly 8"],
    [{ min: "abc" }, null],
    [{ kind: "check" as const }, "pass"],
  ])("the window shown while typing %j is %j (lib/route/rules.ts windowText)", (typed, expected) => {
    expect(draft.previewWindow({ ...draft.readingDraft(undefined, "r"), label: "x", ...typed })).toBe(expected);
  });

  test.each([
    ["14", "d", "end", "curing", holdText({ minutes: 14 * 24 * 60, from: "end", label: "curing" })],
    ["4", "h", "start", "clamp 2 h and rest 2 h", holdText({ minutes: 240, from: "start", label: "clamp 2 h and rest 2 h" })],
    ["4", "h", "start", "", null],
    ["0.001", "min", "end", "blink", null],
  ] as const)("the wait shown for %s %s from %s, %j", (amount, unit, from, label, expected) => {
    const s: draft.StepDraft = { ...draft.stepDraft(undefined, "x"), holdAmount: amount, holdUnit: unit, holdFrom: from, holdLabel: label };
    expect(draft.previewHold(s)).toBe(expected);
  });
});

describe("the server's errors, placed back", () => {
  test("an error lands on its reading's field and stays with it after the steps move", () => {
    let d = draft.draftOf(usual);
    d = draft.updateReading(d, "s1", "s1r0", { absMax: "abc" }); // trim: "± limit"
    d = draft.updateStep(d, "s0", { name: "" });
    const sent = draft.layoutOf(d);
    const fieldErrors = serverErrors(d);
    expect(Object.keys(fieldErrors).sort()).toEqual(["steps.0.name", "steps.1.readings.0.absMax"]);

    const placed = draft.placeErrors(fieldErrors, sent);
    expect(placed.count).toBe(2);
    expect(placed.general).toEqual([]);
    expect(placed.byUid.get("s1r0")?.absMax?.[0]).toMatch(/Enter a number/);
    expect(placed.byUid.get("s0")?.name?.[0]).toMatch(/Name the step/);

    // Moving the trim step first changes where it is, not which reading the error is about.
    d = draft.moveStep(d, 1, -1);
    expect(d[0]!.readings[0]!.uid).toBe("s1r0");
    expect(draft.placeErrors(fieldErrors, sent).byUid.get("s1r0")?.absMax).toBeDefined();
  });

  test("a repeated key is marked on the second step; two steps named alike get the same made-up key", () => {
    let d = draft.draftOf(usual.slice(0, 2));
    d = draft.updateStep(d, "s1", { key: "", name: "Forming press" });
    d = draft.updateStep(d, "s0", { key: "" });
    const placed = draft.placeErrors(serverErrors(d), draft.layoutOf(d));
    expect(placed.byUid.get("s1")?.key?.[0]).toMatch(/Step 1 already has the key “forming-press”/);
    expect(placed.byUid.has("s0")).toBe(false);
  });

  test.each<[Record<string, string[]>, string[], number, string]>([
    [{ steps: ["A route needs at least one step."] }, ["A route needs at least one step."], 0, "the route as a whole"],
    [{ "steps.7.name": ["Name the step."] }, ["Name the step."], 0, "a place the form no longer has"],
    [{ note: ["Say why the route changes."] }, [], 1, "the note has its own field"],
    [{ "steps.0": ["A step has no field colour."] }, [], 1, "the step as a whole"],
  ])("%j goes to general %j, counted %i (%s)", (fieldErrors, general, count) => {
    const placed = draft.placeErrors(fieldErrors, { steps: [{ uid: "s0", readings: [] }] });
    expect(placed.general).toEqual(general);
    expect(placed.count).toBe(count);
  });

  test("errors without an input of their own are listed above the step or reading", () => {
    const placed = draft.placeErrors(
      { "steps.0": ["A step has no field colour."], "steps.0.holdAfter": ["A hold has no field x."], "steps.0.readings.0": ["A reading has no field y."], "steps.0.readings.0.max": ["too low"] },
      { steps: [{ uid: "s0", readings: ["s0r0"] }] },
    );
    expect(draft.otherErrors(placed.byUid.get("s0"), draft.STEP_FIELDS)).toEqual(["A step has no field colour."]);
    expect(placed.byUid.get("s0")?.holdAfter).toEqual(["A hold has no field x."]);
    expect(draft.otherErrors(placed.byUid.get("s0r0"), draft.READING_FIELDS)).toEqual(["A reading has no field y."]);
  });
});
