/**
 * The administrator's route editor: an edit is saved as the model's next version through the
 * guarded action; version 1 and the pairs on it are left as they were; bad input is refused with
 * errors keyed by their place in the form ("steps.0.readings.0.max") and writes nothing.
 */
import { asc, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { events, finishes, items, models, processSpecs, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { startSession } from "@/lib/auth/sessions";
import type { FormState } from "@/lib/forms";
import { defaultRoute } from "@/lib/route/default-spec";
import { pairRoute, recordStep } from "@/lib/route/pair-route";
import type { StepSpec } from "@/lib/route/types";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { RedirectSignal, request } from "../setup/next-request";

// Signed in by setting request.sessionId: tests/integration/setup.ts mocks next/* with tests/setup/next-request.ts.

const { saveRouteVersionAction } = await import("@/app/(workshop)/admin/routes/actions");

const db = () => getDb();
const ids = new Map<string, string>();
let model: typeof models.$inferSelect;

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const rows = await db().select({ id: users.id, email: users.email }).from(users);
  for (const role of ["admin", "cabinet", "quality", "veneer"]) ids.set(role, rows.find((r) => r.email === `${role}@demo.twinleaf.test`)!.id);
  model = (await db().select().from(models).orderBy(asc(models.code))).find((m) => m.leavesPerFace === 2)!;
});

async function signInAs(role: "admin" | "cabinet" | "quality" | null) {
  request.sessionId = role ? (await startSession(ids.get(role)!, db())).session.id : null;
}

type Outcome = { state: FormState; redirectedTo?: undefined } | { state?: undefined; redirectedTo: string };

async function save(fields: { modelId?: string; baseVersion?: string; note?: string; steps?: unknown }): Promise<Outcome> {
  const fd = new FormData();
  if (fields.modelId !== undefined) fd.set("modelId", fields.modelId);
  if (fields.baseVersion !== undefined) fd.set("baseVersion", fields.baseVersion);
  if (fields.note !== undefined) fd.set("note", fields.note);
  if (fields.steps !== undefined) fd.set("steps", typeof fields.steps === "string" ? fields.steps : JSON.stringify(fields.steps));
  try {
    return { state: await saveRouteVersionAction(undefined, fd) };
  } catch (e) {
    if (e instanceof RedirectSignal) return { redirectedTo: e.to };
    throw e;
  }
}

/** The spec rows of the model and the events, to show a refusal wrote nothing. */
async function written() {
  const specs = await db().select().from(processSpecs).orderBy(asc(processSpecs.modelId), asc(processSpecs.version));
  const [ev] = await db().select({ n: sql<number>`count(*)` }).from(events);
  return { specs, events: Number(ev?.n ?? 0) };
}

async function versionsOf(modelId: string) {
  return db().select().from(processSpecs).where(eq(processSpecs.modelId, modelId)).orderBy(asc(processSpecs.version));
}

/** A veneered pair from a new flitch, as the veneer room makes it (see route.test.ts). */
async function newPair() {
  const walnut = (await db().select().from(finishes)).find((f) => f.kind === "veneer")!;
  const actor = { id: ids.get("veneer")! };
  const flitch = await receiveFlitch(db(), { finishId: walnut.id, logReference: "R", supplier: "S", receivedOn: "2026-11-01", leafThicknessMm: 0.6, leafCount: 4 }, actor);
  const view = (await flitchView(db(), flitch.identity))!;
  for (const l of view.leaves) await measureLeaf(db(), l.id, { lengthMm: 900, widthMm: 300, usable: true }, actor);
  const [made] = await confirmRuns(db(), { flitchId: flitch.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, actor);
  return made!.pair;
}

const withoutSeq = (steps: StepSpec[]) => steps.map(({ seq: _s, ...rest }) => rest);

/** Version 1 with the press window narrowed, a step moved, and a new inspection step. */
function editedSteps() {
  const steps = withoutSeq(defaultRoute()) as Record<string, unknown>[];
  const press = structuredClone(steps[0]!) as { readings: { min?: number; max?: number }[] };
  press.readings[0]!.min = 136;
  press.readings[0]!.max = 139;
  steps[0] = press as unknown as Record<string, unknown>;
  steps.splice(2, 0, { key: "check-trim", name: "Hand check after trimming", station: "inspection", readings: [{ key: "pass", label: "Edges square", unit: null, kind: "check" }], note: "  A look along the edges (common practice).  " });
  return steps;
}

describe("saving a route as a new version", () => {
  test("a valid edit makes version 2, renumbers the steps 1…n, and leaves version 1 and its pair untouched", async () => {
    await signInAs("admin");
    // A pair that started on version 1.
    const started = await newPair();
    await recordStep(db(), { pairId: started.id, seq: 1, sides: ["L", "R"], readings: { platenC: "137", minutes: "22" } }, { id: ids.get("cabinet")! });
    const [v1] = await versionsOf(model.id);
    expect(v1!.version).toBe(1);

    const out = await save({ modelId: model.id, baseVersion: "1", note: "  Narrower press window; a hand check after trimming.  ", steps: editedSteps() });
    expect(out.state, JSON.stringify(out.state)).toBeUndefined();
    expect(out.redirectedTo).toBe(`/admin/routes?saved=${model.code}&version=2&kind=cabinet`);

    const after = await versionsOf(model.id);
    expect(after.map((v) => v.version)).toEqual([1, 2]);
    expect(after[0]).toEqual(v1);
    const v2 = after[1]!;
    expect(v2.note).toBe("Narrower press window; a hand check after trimming.");
    expect(v2.createdBy).toBe(ids.get("admin"));
    expect(v2.steps.map((s) => s.seq)).toEqual(v2.steps.map((_s, i) => i + 1));
    expect(v2.steps).toHaveLength(defaultRoute().length + 1);
    expect(v2.steps[0]!.readings[0]).toEqual({ key: "platenC", label: "Platen temperature", unit: "°C", kind: "number", min: 136, max: 139 });
    expect(v2.steps[2]).toEqual({ seq: 3, key: "check-trim", name: "Hand check after trimming", station: "inspection", readings: [{ key: "pass", label: "Edges square", unit: null, kind: "check" }], note: "A look along the edges (common practice)." });
    // The notes of the usual route are kept as they were.
    expect(v2.steps.find((s) => s.key === "brace")).toEqual({ ...defaultRoute().find((s) => s.key === "brace")!, seq: 4 });

    // The started pair keeps version 1; a new one takes version 2.
    const pair = (await db().select().from(items).where(eq(items.id, started.id)))[0]!;
    expect((await pairRoute(db(), pair)).spec.version).toBe(1);
    const fresh = await newPair();
    expect((await pairRoute(db(), fresh)).spec.version).toBe(2);

    const [event] = await db().select().from(events).where(eq(events.id, v2.eventId!));
    expect(event).toMatchObject({ type: "spec.created", actorId: ids.get("admin"), subjectId: model.id });
  });

  test("an edit made from a version that is no longer the newest is refused", async () => {
    await signInAs("admin");
    const before = await written();
    const out = await save({ modelId: model.id, baseVersion: "1", note: "From an old tab", steps: withoutSeq(defaultRoute()) });
    expect(out.state).toMatchObject({ ok: false, status: 409 });
    expect(out.state!.message).toMatch(/Version 2 of .* was saved by .* after you opened this form/);
    expect(await written()).toEqual(before);
  });

  test("saving the same steps again is refused: a version must change something", async () => {
    await signInAs("admin");
    const current = (await versionsOf(model.id)).at(-1)!;
    const before = await written();
    const out = await save({ modelId: model.id, baseVersion: String(current.version), note: "No change at all", steps: current.steps });
    expect(out.state).toMatchObject({ ok: false, status: 400 });
    expect(out.state!.message).toMatch(/Nothing to save/);
    expect(await written()).toEqual(before);
  });
});

describe("bad input is refused with its place in the form, and writes nothing", () => {
  const base = () => withoutSeq(defaultRoute()) as Record<string, any>[]; // eslint-disable-line @typescript-eslint/no-explicit-any

  async function refused(fields: Parameters<typeof save>[0]) {
    await signInAs("admin");
    const current = (await versionsOf(model.id)).at(-1)!;
    const before = await written();
    const out = await save({ modelId: model.id, baseVersion: String(current.version), note: "A reason for it", ...fields });
    expect(out.redirectedTo, "nothing saved, no redirect").toBeUndefined();
    expect(out.state).toMatchObject({ ok: false, status: 400 });
    expect(await written()).toEqual(before);
    return out.state!.fieldErrors ?? {};
  }

  test("a lowest value above the highest", async () => {
    const steps = base();
    steps[0]!.readings[0].min = 141;
    const errors = await refused({ steps });
    expect(errors["steps.0.readings.0.max"]?.[0]).toMatch(/highest value \(140\) is below the lowest \(141\)/);
  });

  test("an unknown station", async () => {
    const steps = base();
    steps[3]!.station = "paint-shop";
    const errors = await refused({ steps });
    expect(errors["steps.3.station"]).toEqual(["Choose a station from the list."]);
  });

  test("a step key used twice, and a reading key used twice in one step, even alongside other errors", async () => {
    const steps = base();
    steps[4]!.key = "press";
    steps[0]!.readings[1].key = "platenC";
    steps[6]!.name = "";
    const errors = await refused({ steps });
    expect(errors["steps.4.key"]?.[0]).toMatch(/Step 1 already has the key “press”/);
    expect(errors["steps.0.readings.1.key"]?.[0]).toMatch(/already has the key “platenC”/);
    expect(errors["steps.6.name"]?.[0]).toMatch(/Name the step/);
  });

  test("a key that is not slug-like", async () => {
    const steps = base();
    steps[1]!.key = "Trim Step";
    const errors = await refused({ steps });
    expect(errors["steps.1.key"]?.[0]).toMatch(/small letters and digits/);
  });

  test("no steps at all", async () => {
    const errors = await refused({ steps: [] });
    expect(errors.steps).toEqual(["A route needs at least one step."]);
  });

  test("steps that are not JSON, or missing", async () => {
    expect((await refused({ steps: "[{" })).steps?.[0]).toMatch(/did not arrive whole/);
    expect((await refused({ steps: undefined })).steps?.[0]).toMatch(/steps are missing/);
  });

  test("a missing or blank note", async () => {
    expect((await refused({ note: undefined, steps: base() })).note?.[0]).toMatch(/Say why the route changes/);
    expect((await refused({ note: "   ", steps: base() })).note?.[0]).toMatch(/Say why the route changes/);
  });

  test("a ± limit of zero, a hold of more than 60 days, a hold without a name, a check with a window", async () => {
    const steps = base();
    steps[1]!.readings[0].absMax = 0;
    steps[2]!.holdAfter = { minutes: 61 * 24 * 60, from: "start", label: "" };
    steps[4]!.readings[0].min = 1;
    const errors = await refused({ steps });
    expect(errors["steps.1.readings.0.absMax"]?.[0]).toMatch(/above 0/);
    expect(errors["steps.2.holdAfter.minutes"]).toEqual(["A wait is at most 60 days."]);
    expect(errors["steps.2.holdAfter.label"]?.[0]).toMatch(/Name the wait/);
    expect(errors["steps.4.readings.0.min"]?.[0]).toMatch(/A check is passed or not/);
  });

  test("a field StepSpec does not have, and a number given as text", async () => {
    const steps = base();
    steps[0]!.colour = "red";
    steps[0]!.readings[0].max = "hot";
    const errors = await refused({ steps });
    expect(errors["steps.0"]?.[0]).toMatch(/A step has no field colour/);
    expect(errors["steps.0.readings.0.max"]?.[0]).toMatch(/Enter a number/);
  });

  test("an unknown model", async () => {
    await signInAs("admin");
    const before = await written();
    const out = await save({ modelId: "no-such-model", baseVersion: "1", note: "A reason for it", steps: base() });
    expect(out.state).toMatchObject({ ok: false, status: 404 });
    expect(await written()).toEqual(before);
  });
});

describe("who may save a route", () => {
  test("the action names admin.reference", () => {
    expect(saveRouteVersionAction.permission).toBe("admin.reference");
  });

  test.each(["cabinet", "quality"] as const)("as %s, a valid edit is refused with 403 and writes nothing", async (role) => {
    await signInAs(role);
    const current = (await versionsOf(model.id)).at(-1)!;
    const before = await written();
    const out = await save({ modelId: model.id, baseVersion: String(current.version), note: "Not mine to change", steps: editedSteps() });
    expect(out.state).toMatchObject({ ok: false, status: 403 });
    expect(await written()).toEqual(before);
  });

  test("signed out, it is refused with 401", async () => {
    await signInAs(null);
    const before = await written();
    const out = await save({ modelId: model.id, baseVersion: "2", note: "Anyone", steps: editedSteps() });
    expect(out.state).toMatchObject({ ok: false, status: 401 });
    expect(await written()).toEqual(before);
  });
});
