/**
 * Model versions: a change to a model is a new version; a pair started before it is tested,
 * assembled and packed under its own version while a new pair gets the new one; two saves fired at
 * once (a model, and a route) leave exactly one winner and the other told who saved first; bad
 * input and a code already in serials are refused and write nothing.
 */
import { asc, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { events, itemModelVersions, models, modelVersions, processSpecs, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { pairContext } from "@/lib/assembly/context";
import { createItem, fit } from "@/lib/genealogy/graph";
import { recordFinalTest } from "@/lib/lab/final-test";
import { defaultRoute } from "@/lib/route/default-spec";
import { createSpecVersion, currentSpec } from "@/lib/route/specs";
import { allocateSerial } from "@/lib/serials/allocator";
import { modelSpecOf, packingListOfItem } from "@/lib/workshop/model-spec-of";
import { type ModelSpec } from "@/lib/workshop/model-spec";
import { createModel, currentModelSpec, saveModelVersion, setModelActive } from "@/lib/workshop/models";

const db = () => getDb();
let admin = "";
let adminName = "";
let lab = "";
let model: typeof models.$inferSelect;

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const [a] = await db().select().from(users).where(eq(users.email, "admin@demo.twinleaf.test"));
  admin = a!.id;
  adminName = a!.name;
  lab = (await db().select().from(users).where(eq(users.email, "lab@demo.twinleaf.test")))[0]!.id;
  model = (await db().select().from(models).orderBy(asc(models.code)))[0]!;
});

/** A built pair waiting for its final test, as assembly leaves it (see final-test.test.ts). */
async function builtPair() {
  return db().transaction(async (tx) => {
    const by = { actorId: lab, station: "assembly" as const };
    const pair = await createItem(tx, { kind: "pair", identity: await allocateSerial(tx, { kind: "pair", code: model.code, year: 2026 }), state: "awaiting_test", modelId: model.id }, by);
    for (const side of ["L", "R"]) {
      const s = await createItem(tx, { kind: "speaker", identity: await allocateSerial(tx, { kind: "speaker", code: model.code, year: 2026 }), state: "built", modelId: model.id, attrs: { side } }, by);
      await fit(tx, { parent: pair, child: s, position: side }, by);
    }
    return pair;
  });
}

/** A flat response 1/12 octave apart from 100 Hz, shifted by `level` dB. */
const flat = (level: number) => ({ name: "r.txt", text: ["Freq SPL", ...Array.from({ length: 12 * 8 }, (_, k) => `${(100 * 2 ** (k / 12)).toFixed(3)} ${level}`)].join("\n") });

async function counts() {
  const [v] = await db().select({ n: sql<number>`count(*)` }).from(modelVersions);
  const [e] = await db().select({ n: sql<number>`count(*)` }).from(events);
  const [p] = await db().select({ n: sql<number>`count(*)` }).from(processSpecs);
  return { versions: Number(v!.n), events: Number(e!.n), specs: Number(p!.n) };
}

const plain = (s: Awaited<ReturnType<typeof currentModelSpec>>): ModelSpec => {
  const { id: _id, version: _version, active: _active, ...spec } = s!;
  return spec;
};

describe("model versions", () => {
  test("the demo's models start at version 1, and items made now are pinned to it", async () => {
    const spec = await currentModelSpec(db(), model.id);
    expect(spec!.version).toBe(1);
    expect(spec!.crossovers).toEqual([{ position: "XO", count: 1 }]);
    const pair = await builtPair();
    const [pin] = await db().select({ version: modelVersions.version }).from(itemModelVersions).innerJoin(modelVersions, eq(modelVersions.id, itemModelVersions.modelVersionId)).where(eq(itemModelVersions.itemId, pair.id));
    expect(pin!.version).toBe(1);
  });

  test("a pair started before a change keeps its version for the test, assembly and packing; a new pair gets the new one", async () => {
    const before = await builtPair();
    const v1 = (await currentModelSpec(db(), model.id))!;
    // Version 2: a tighter finished-pair limit, a second bass position, a longer warranty, one more packing line.
    const next: ModelSpec = {
      ...plain(v1),
      pairResponseLimitDb: 0.5,
      positions: [...v1.positions, { position: "B9", partType: "bass", count: 1 }],
      warrantyMonths: v1.warrantyMonths + 12,
      packingList: [...v1.packingList, "Spare fuse"],
    };
    const saved = await saveModelVersion(db(), { modelId: model.id, spec: next, note: "Tighter pair limit after the listening panel", baseVersion: v1.version }, { id: admin });
    expect(saved.version).toBe(v1.version + 1);
    expect(saved.changed).toEqual(["finished pair limit", "warranty", "drive-unit positions", "packing list"]);
    const after = await builtPair();

    // 0.8 dB apart in every band: within version 1's 1.0 dB (the demo's limit), over version 2's 0.5 dB.
    const old = await recordFinalTest(db(), { pair: before.identity, left: flat(90), right: flat(90.8) }, { id: lab });
    const fresh = await recordFinalTest(db(), { pair: after.identity, left: flat(90), right: flat(90.8) }, { id: lab });
    expect([old.limitDb, old.comparison.pass]).toEqual([v1.pairResponseLimitDb, true]);
    expect([fresh.limitDb, fresh.comparison.pass]).toEqual([0.5, false]);

    const oldCtx = await pairContext(db(), before);
    const newCtx = await pairContext(db(), after);
    expect(oldCtx.positions.map((p) => p.position)).not.toContain("B9");
    expect(newCtx.positions.map((p) => p.position)).toContain("B9");

    expect(await packingListOfItem(db(), before)).not.toContain("Spare fuse");
    expect(await packingListOfItem(db(), after)).toContain("Spare fuse");
    expect((await modelSpecOf(db(), before))!.warrantyMonths).toBe(v1.warrantyMonths);
    expect((await modelSpecOf(db(), after))!.warrantyMonths).toBe(v1.warrantyMonths + 12);
  });

  test("two saves of the same model at once: exactly one wins, the other is told who saved first, nothing extra is written", async () => {
    const current = (await currentModelSpec(db(), model.id))!;
    const before = await counts();
    const a = { ...plain(current), name: `${current.name} A` };
    const b = { ...plain(current), name: `${current.name} B` };
    const results = await Promise.allSettled([
      saveModelVersion(db(), { modelId: model.id, spec: a, note: "Rename A", baseVersion: current.version }, { id: admin }),
      saveModelVersion(db(), { modelId: model.id, spec: b, note: "Rename B", baseVersion: current.version }, { id: admin }),
    ]);
    const won = results.filter((r) => r.status === "fulfilled");
    const lost = results.filter((r): r is PromiseRejectedResult => r.status === "rejected");
    expect(won).toHaveLength(1);
    expect(lost).toHaveLength(1);
    expect(lost[0]!.reason.status).toBe(409);
    expect(lost[0]!.reason.message).toBe(
      `Version ${current.version + 1} of ${model.code} was saved by ${adminName} after you opened this form, so yours was not saved. Open the model again to start from version ${current.version + 1}.`,
    );
    const afterCounts = await counts();
    expect(afterCounts.versions).toBe(before.versions + 1);
    expect(afterCounts.events).toBe(before.events + 1);
  });

  test("two saves of the same route at once: exactly one wins, the other gets the 409 message", async () => {
    const latest = (await currentSpec(db(), model.id))!;
    const before = await counts();
    const steps = (note: string) => defaultRoute().map((s) => (s.seq === 1 ? { ...s, name: `${s.name} (${note})` } : s));
    const results = await Promise.allSettled([
      createSpecVersion(db(), { modelId: model.id, steps: steps("a"), note: "Edit A", baseVersion: latest.version }, { id: admin }),
      createSpecVersion(db(), { modelId: model.id, steps: steps("b"), note: "Edit B", baseVersion: latest.version }, { id: admin }),
    ]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    const lost = results.filter((r): r is PromiseRejectedResult => r.status === "rejected");
    expect(lost).toHaveLength(1);
    expect(lost[0]!.reason.status).toBe(409);
    expect(lost[0]!.reason.message).toMatch(new RegExp(`^Version ${latest.version + 1} of ${model.code} was saved by ${adminName} after you opened this form`));
    const afterCounts = await counts();
    expect(afterCounts.specs).toBe(before.specs + 1);
    expect(afterCounts.events).toBe(before.events + 1);
  });

  test("a code already inside serials cannot change; a taken code is refused; neither writes", async () => {
    const current = (await currentModelSpec(db(), model.id))!;
    const before = await counts();
    const renamed = saveModelVersion(db(), { modelId: model.id, spec: { ...plain(current), code: "ZZ9" }, note: "New code", baseVersion: current.version }, { id: admin });
    await expect(renamed).rejects.toMatchObject({ status: 409, fieldErrors: { code: [`${model.code} is inside the serials already made, so it stays.`] } });
    const taken = createModel(db(), { spec: { ...plain(current), name: "Copy" }, note: "" }, { id: admin });
    await expect(taken).rejects.toMatchObject({ status: 409, fieldErrors: { code: [`${model.code} is taken by another model: choose another code.`] } });
    expect(await counts()).toEqual(before);
  });

  test("an unchanged form makes no version", async () => {
    const current = (await currentModelSpec(db(), model.id))!;
    await expect(saveModelVersion(db(), { modelId: model.id, spec: plain(current), note: "Nothing", baseVersion: current.version }, { id: admin })).rejects.toMatchObject({ status: 400 });
  });

  test("a model given its first trim position gets the usual trim-part route as version 1", async () => {
    const bare = (await db().select().from(models).orderBy(asc(models.code))).map((m) => m.id);
    let target: string | null = null;
    for (const id of bare) if (!(await currentSpec(db(), id, "trim"))) target ??= id;
    expect(target).not.toBeNull();
    const current = (await currentModelSpec(db(), target!))!;
    await saveModelVersion(db(), { modelId: target!, spec: { ...plain(current), trimPositions: [{ position: "BEZ", label: "Bezel", count: 1 }] }, note: "A bezel from now on", baseVersion: current.version }, { id: admin });
    const trim = await currentSpec(db(), target!, "trim");
    expect(trim?.version).toBe(1);
    expect(trim?.routeKind).toBe("trim");
  });

  test("a new model starts at version 1 with the usual route; retiring it stops new route versions, and restoring brings it back", async () => {
    const base = plain(await currentModelSpec(db(), model.id));
    // 09521234543213: a valid GTIN-14 published by GS1 (docs/REFERENCES.md, § GS1).
    const made = await createModel(db(), { spec: { ...base, code: "NW1", name: "New one", pairGtin: "09521234543213", trimPositions: [{ position: "TOP", label: "Top housing", count: 1 }] }, note: "First of its line" }, { id: admin });
    expect(made.version).toBe(1);
    const spec = (await currentModelSpec(db(), made.id))!;
    expect(spec.trimPositions).toEqual([{ position: "TOP", label: "Top housing", count: 1 }]);
    const route = (await currentSpec(db(), made.id))!;
    expect(route.version).toBe(1);
    await setModelActive(db(), { modelId: made.id, active: false, reason: "Line stopped" }, { id: admin });
    await expect(createSpecVersion(db(), { modelId: made.id, steps: defaultRoute().slice(0, 3), note: "Shorter", baseVersion: 1 }, { id: admin })).rejects.toMatchObject({ status: 409 });
    await setModelActive(db(), { modelId: made.id, active: true, reason: "Back by demand" }, { id: admin });
    const saved = await createSpecVersion(db(), { modelId: made.id, steps: defaultRoute().slice(0, 3), note: "Shorter", baseVersion: 1 }, { id: admin });
    expect(saved.version).toBe(2);
  });
});
