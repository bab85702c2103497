/**
 * The admin's reference data through its server actions: models, finishes, dealers and owners are
 * added, edited and retired with an event each; bad input is refused beside its field and writes
 * nothing; an owner's correction keeps before, after and reason; a merge moves ownerships and
 * consent to the survivor by appending, and the duplicate points at it.
 */
import { asc, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { dealers, events, finishes, models, modelVersions, ownerConsents, owners, ownerships, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { startSession } from "@/lib/auth/sessions";
import type { FormState } from "@/lib/forms";
import { createItem } from "@/lib/genealogy/graph";
import { ownersOfPair, recordConsent } from "@/lib/owners";
import { allocateSerial } from "@/lib/serials/allocator";
import { RedirectSignal, request } from "../setup/next-request";

const { saveModelAction, retireModelAction } = await import("@/app/(workshop)/admin/models/actions");
const { saveFinishAction, retireFinishAction } = await import("@/app/(workshop)/admin/finishes/actions");
const { saveDealerAction } = await import("@/app/(workshop)/admin/dealers/actions");
const { correctOwnerAction, mergeOwnersAction } = await import("@/app/(workshop)/admin/owners/actions");

const db = () => getDb();
let adminId = "";

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  adminId = (await db().select().from(users).where(eq(users.email, "admin@demo.twinleaf.test")))[0]!.id;
  request.sessionId = (await startSession(adminId, db())).session.id;
});

type Action = (prev: FormState | undefined, fd: FormData) => Promise<FormState>;

/** Calls an action with fields; a redirect (a save) is answered as { ok: true, redirectedTo }. */
async function call(action: Action, fields: Record<string, string>): Promise<FormState & { redirectedTo?: string }> {
  const fd = new FormData();
  for (const [k, v] of Object.entries(fields)) fd.set(k, v);
  try {
    return await action(undefined, fd);
  } catch (e) {
    if (e instanceof RedirectSignal) return { ok: true, redirectedTo: e.to };
    throw e;
  }
}

/** Every row of the tables these forms write, and the number of events: a refusal leaves them as they were. */
async function snapshot() {
  const [ev] = await db().select({ n: sql<number>`count(*)` }).from(events);
  return {
    models: await db().select().from(models).orderBy(asc(models.code)),
    versions: Number((await db().select({ n: sql<number>`count(*)` }).from(modelVersions))[0]!.n),
    finishes: await db().select().from(finishes).orderBy(asc(finishes.code)),
    dealers: await db().select().from(dealers).orderBy(asc(dealers.code)),
    owners: await db().select().from(owners).orderBy(asc(owners.id)),
    events: Number(ev!.n),
  };
}

const MODEL = {
  code: "QX1",
  name: "Quillon",
  leavesPerFace: "2",
  minLeafLengthMm: "600",
  minLeafWidthMm: "140",
  pairResponseLimitDb: "1.0",
  responseMinHz: "150",
  responseMaxHz: "10000",
  // docs/REFERENCES.md, § GS1: a valid GTIN-14 published by GS1.
  pairGtin: "95012345678903",
  warrantyMonths: "24",
  positions: JSON.stringify([
    { position: "T", partType: "tweeter", count: "1" },
    { position: "B", partType: "bass", count: "1" },
  ]),
  crossovers: JSON.stringify([{ position: "XO", count: "1" }]),
  trimPositions: JSON.stringify([{ position: "TOP", label: "Top housing", count: "1" }]),
  tolerances: JSON.stringify([
    { partType: "tweeter", mismatchLimitDb: "0.5" },
    { partType: "bass", mismatchLimitDb: "0.75" },
  ]),
  packingList: "Grilles (2)\nOwner's manual",
  note: "",
};

describe("models through the form", () => {
  test.each([
    // docs/REFERENCES.md, § GS1: 9501234567890 → 3, so a 4 is a wrong check digit.
    ["a GTIN with a wrong check digit", { pairGtin: "95012345678904" }, "pairGtin", "The last digit is the check digit: for 9501234567890 it is 3, not 4. Check the number against the GS1 allocation."],
    ["a position code used twice", { trimPositions: JSON.stringify([{ position: "XO", label: "Plate", count: "1" }]) }, "trimPositions", "XO is used twice (in crossover positions and trim positions): give each position its own code."],
    ["a negative limit", { pairResponseLimitDb: "-1" }, "pairResponseLimitDb", "The finished pair limit must be more than 0 dB."],
    ["a code already taken", { code: "PW2" }, "code", "PW2 is taken by another model: choose another code."],
  ])("%s is refused beside its field and writes nothing", async (_name, over, field, message) => {
    const before = await snapshot();
    const state = await call(saveModelAction, { ...MODEL, ...over });
    expect(state.ok).toBe(false);
    expect(state.fieldErrors?.[field]).toEqual([message]);
    expect(await snapshot()).toEqual(before);
  });

  test("a new model is version 1; an edit with its reason is version 2; retiring it keeps it listed", async () => {
    const made = await call(saveModelAction, MODEL);
    expect(made.redirectedTo).toBe("/admin/models/QX1");
    const [m] = await db().select().from(models).where(eq(models.code, "QX1"));
    const edit = await call(saveModelAction, { ...MODEL, modelId: m!.id, baseVersion: "1", warrantyMonths: "36", note: "Three years from next season" });
    expect(edit.redirectedTo).toBe("/admin/models/QX1?saved=2");
    const versions = await db().select().from(modelVersions).where(eq(modelVersions.modelId, m!.id)).orderBy(asc(modelVersions.version));
    expect(versions.map((v) => [v.version, v.note])).toEqual([
      [1, ""],
      [2, "Three years from next season"],
    ]);
    // An edit opened on version 1 after version 2 was saved is refused, naming who saved it.
    const stale = await call(saveModelAction, { ...MODEL, modelId: m!.id, baseVersion: "1", warrantyMonths: "48", note: "Four years" });
    expect(stale.status).toBe(409);
    expect(stale.message).toMatch(/^Version 2 of QX1 was saved by .+ after you opened this form/);
    const noReason = await call(saveModelAction, { ...MODEL, modelId: m!.id, baseVersion: "2", warrantyMonths: "48", note: "" });
    expect(noReason.fieldErrors?.note).toEqual(["Say why the model changes, in a few words: it is kept with the version."]);
    const retired = await call(retireModelAction, { modelId: m!.id, active: "false", reason: "Line paused" });
    expect(retired.ok).toBe(true);
    expect((await db().select().from(models).where(eq(models.id, m!.id)))[0]!.active).toBe(false);
    const [ev] = await db().select().from(events).where(eq(events.type, "model.retired"));
    expect(ev!.reason).toBe("Line paused");
  });
});

describe("finishes and dealers through their forms", () => {
  test.each([
    ["a finish code already taken", saveFinishAction, { kind: "veneer", code: "WAL", name: "Walnut again", botanicalName: "Juglans regia" }, "code", "WAL is taken by another finish: choose another code."],
    ["a dealer code already taken", saveDealerAction, { code: "MLR", name: "Another", address: "1 Road", city: "Town", country: "GB", email: "a@shop.test" }, "code", "MLR is taken by another dealer: choose another code."],
    // docs/REFERENCES.md, § Countries (ISO 3166-1): UK is exceptionally reserved; the United Kingdom is GB.
    ["a country that is not an ISO code", saveDealerAction, { code: "NEW", name: "New shop", address: "1 Road", city: "Town", country: "UK", email: "a@shop.test" }, "country", "UK is not an ISO 3166-1 code: United Kingdom is GB."],
    ["a country that does not exist", saveDealerAction, { code: "NEW", name: "New shop", address: "1 Road", city: "Town", country: "XX", email: "a@shop.test" }, "country", "XX is not an ISO 3166-1 country code. Check the code, e.g. GB, FR, DE."],
  ] as [string, Action, Record<string, string>, string, string][])("%s is refused beside its field and writes nothing", async (_name, action, fields, field, message) => {
    const before = await snapshot();
    const state = await call(action, fields);
    expect(state.fieldErrors?.[field]).toEqual([message]);
    expect(await snapshot()).toEqual(before);
  });

  test("a dealer is added with its address; an edit records what changed", async () => {
    const added = await call(saveDealerAction, { code: "TGS", name: "Tarn Gate Sound", address: "3 Weir Row\nUnit 2", postcode: "TG4 9XX", city: "Tarnby", country: "gb", email: "Orders@TarnGate.test" });
    expect(added.redirectedTo).toBe("/admin/dealers?saved=TGS");
    const [d] = await db().select().from(dealers).where(eq(dealers.code, "TGS"));
    expect([d!.address, d!.country, d!.email, d!.active]).toEqual(["3 Weir Row\nUnit 2", "GB", "orders@tarngate.test", true]);
    await call(saveDealerAction, { dealerId: d!.id, code: "TGS", name: "Tarn Gate Sound", address: "3 Weir Row\nUnit 2", postcode: "TG4 9XY", city: "Tarnby", country: "GB", email: "orders@tarngate.test" });
    const [ev] = await db().select().from(events).where(eq(events.type, "dealer.changed"));
    expect(ev!.data).toMatchObject({ changed: ["postcode"], from: { postcode: "TG4 9XX" }, to: { postcode: "TG4 9XY" } });
  });

  test("a finish is retired with its reason and stays listed", async () => {
    const [f] = await db().select().from(finishes).where(eq(finishes.code, "SYC"));
    const state = await call(retireFinishAction, { finishId: f!.id, active: "false", reason: "No more ripple logs this year" });
    expect(state.ok).toBe(true);
    expect((await db().select().from(finishes).where(eq(finishes.id, f!.id)))[0]!.active).toBe(false);
    const refused = await call(retireFinishAction, { finishId: f!.id, active: "false", reason: "Again" });
    expect(refused.status).toBe(409);
  });
});

describe("owners", () => {
  async function ownerWithPair(name: string, email: string, consent: boolean | null) {
    return db().transaction(async (tx) => {
      const id = `owner-${name.replace(/\W/g, "")}`;
      await tx.insert(owners).values({ id, name, email, town: "Lenby", country: "GB" });
      const [model] = await tx.select().from(models).orderBy(asc(models.code)).limit(1);
      const pair = await createItem(tx, { kind: "pair", identity: await allocateSerial(tx, { kind: "pair", code: model!.code, year: 2026 }), state: "shipped", modelId: model!.id }, { actorId: adminId, station: "packing" });
      await tx.insert(ownerships).values({ ownerId: id, itemId: pair.id, since: new Date("2026-03-01T12:00:00Z") });
      if (consent !== null) await recordConsent(tx, { ownerId: id, consent }, { id: adminId });
      return { id, pair };
    });
  }

  test("a correction needs a reason, updates the record and keeps before and after in its event", async () => {
    const { id } = await ownerWithPair("Ada Quell", "ada@quell.test", null);
    const before = await snapshot();
    const noReason = await call(correctOwnerAction, { ownerId: id, name: "Ada Quell", email: "ada@quell.test", town: "Lenby-on-Tarn", country: "GB", reason: "" });
    expect(noReason.fieldErrors?.reason).toEqual(["Say why, in a few words: the reason is kept with the change."]);
    const badCountry = await call(correctOwnerAction, { ownerId: id, name: "Ada Quell", email: "ada@quell.test", town: "Lenby", country: "UK", reason: "Moved" });
    expect(badCountry.fieldErrors?.country).toEqual(["UK is not an ISO 3166-1 code: United Kingdom is GB."]);
    expect(await snapshot()).toEqual(before);
    const ok = await call(correctOwnerAction, { ownerId: id, name: "Ada Quell", email: "ada@quell.test", town: "Lenby-on-Tarn", country: "GB", reason: "Town misspelt at intake" });
    expect(ok.ok).toBe(true);
    const [ev] = await db().select().from(events).where(eq(events.type, "owner.corrected"));
    expect([ev!.reason, ev!.data]).toEqual(["Town misspelt at intake", { changed: ["town"], from: { town: "Lenby" }, to: { town: "Lenby-on-Tarn" } }]);
  });

  test("a merge registers the duplicate's pair to the survivor from the same day, carries its newer consent, and keeps the duplicate pointing at it", async () => {
    const keep = await ownerWithPair("Bo Rensk", "bo@rensk.test", false);
    const dup = await ownerWithPair("B. Rensk", "b.rensk@mail.test", true);
    const ownershipsBefore = await db().select().from(ownerships);
    const same = await call(mergeOwnersAction, { keepId: keep.id, mergeId: keep.id, reason: "Same person" });
    expect(same.fieldErrors?.mergeId).toEqual(["Choose two different records: a record cannot be merged into itself."]);
    const merged = await call(mergeOwnersAction, { keepId: keep.id, mergeId: dup.id, reason: "Registered twice with two addresses" });
    expect(merged.ok).toBe(true);
    // Appended, never edited: every ownership row before is still there, unchanged.
    const ownershipsAfter = await db().select().from(ownerships);
    expect(ownershipsAfter.slice(0, ownershipsBefore.length)).toEqual(ownershipsBefore);
    const moved = ownershipsAfter.slice(ownershipsBefore.length);
    expect(moved.map((o) => [o.ownerId, o.itemId, o.since.toISOString()])).toEqual([[keep.id, dup.pair.id, "2026-03-01T12:00:00.000Z"]]);
    expect((await ownersOfPair(db(), dup.pair.id)).map((o) => o.id)).toEqual([keep.id]);
    const [newest] = await db().select().from(ownerConsents).where(eq(ownerConsents.ownerId, keep.id)).orderBy(sql`${ownerConsents.id} DESC`).limit(1);
    expect(newest!.consent).toBe(true);
    expect((await db().select().from(owners).where(eq(owners.id, dup.id)))[0]!.mergedIntoId).toBe(keep.id);
    const again = await call(mergeOwnersAction, { keepId: keep.id, mergeId: dup.id, reason: "Again" });
    expect(again.status).toBe(409);
  });
});
