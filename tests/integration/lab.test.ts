import { eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { items, models, modelTolerances, responses, setMembers, tsParams, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { parseTsCsv } from "@/lib/lab/ts-csv";
import { acceptPlan, batchUnitsView, failUnit, importResponseFiles, importTsRows, matchBatch, recordMeasurement, registerBatch, UnitsTakenError } from "@/lib/lab/units";
import type { LabActor } from "@/lib/vocabulary/actor";
import { failureText } from "./helpers";

const db = () => getDb();
let actor: LabActor;
let model: typeof models.$inferSelect;
let tweeterLimit: number;

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const [u] = await db().select().from(users).where(eq(users.email, "lab@demo.twinleaf.test"));
  actor = { id: u!.id };
  const [t] = await db().select({ model: models, limit: modelTolerances.mismatchLimitDb }).from(modelTolerances).innerJoin(models, eq(models.id, modelTolerances.modelId)).where(eq(modelTolerances.partType, "tweeter")).limit(1);
  model = t!.model;
  tweeterLimit = t!.limit;
});

/** A made-up response file: flat at `level` dB from 1 kHz to 20 kHz, 1/12 octave apart, plus `tilt` dB per octave. */
function responseFile(serial: string, level: number, tilt = 0): string {
  const lines = [`* ${serial}`, "Freq(Hz) SPL(dB) Phase(deg)"];
  for (let k = 0; k <= 12 * 4.33; k++) {
    const hz = 1000 * 2 ** (k / 12);
    lines.push(`${hz.toFixed(2)}\t${(level + tilt * (k / 12)).toFixed(3)}\t${(-k).toFixed(1)}`);
  }
  return lines.join("\n");
}

async function newBatch(count: number) {
  return registerBatch(db(), { partType: "tweeter", partNumber: "T-TEST", maker: "Test maker", lot: "L1", receivedOn: "2026-11-30", makerSerials: [], count }, actor);
}

const countOf = async (table: typeof responses | typeof tsParams) => Number((await db().select({ n: sql<number>`count(*)` }).from(table))[0]!.n);

describe("batches and measurements", () => {
  test("a batch's units get serials, maker serials where scanned, and wait for measurement", async () => {
    const b = await registerBatch(db(), { partType: "tweeter", partNumber: "T-TEST", maker: "Test maker", lot: "L1", receivedOn: "2026-11-30", makerSerials: ["MK001", "MK002", "MK003"], count: 0 }, actor);
    expect(b.code).toMatch(/^TW-2611-\d{2}$/);
    const units = await batchUnitsView(db(), b.id);
    expect(units.map((u) => u.makerSerial).sort()).toEqual(["MK001", "MK002", "MK003"]);
    expect(units.every((u) => u.state === "awaiting_measurement" && /^D-TW-26-/.test(u.identity))).toBe(true);
    expect(await failureText(() => registerBatch(db(), { partType: "tweeter", partNumber: "X", maker: "M", lot: "L", receivedOn: "2026-11-30", makerSerials: ["A1", "A1"], count: 0 }, actor))).toMatch(/scanned twice/);
  });

  test("response files are matched to units by serial in the first line or by the maker's serial in the file name", async () => {
    const b = await registerBatch(db(), { partType: "tweeter", partNumber: "T-TEST", maker: "Test maker", lot: "L2", receivedOn: "2026-11-30", makerSerials: ["MK101", "MK102"], count: 0 }, actor);
    const units = await batchUnitsView(db(), b.id);
    const byMaker = new Map(units.map((u) => [u.makerSerial, u]));
    const saved = await importResponseFiles(
      db(),
      [
        { name: "bench-run-7.txt", text: responseFile(byMaker.get("MK101")!.identity, 90) },
        { name: "MK102.txt", text: responseFile("", 90.2).replace("* \n", "* no serial here\n") },
      ],
      { batchId: b.id, source: "upload" },
      actor,
    );
    expect(saved.map((s) => s.unit).sort()).toEqual([byMaker.get("MK101")!.identity, byMaker.get("MK102")!.identity].sort());
    const after = await batchUnitsView(db(), b.id);
    expect(after.every((u) => u.state === "measured" && u.responseId !== null)).toBe(true);
  });

  test("one bad file among good ones: nothing is saved and the error names the file and line", async () => {
    const b = await newBatch(2);
    const [u1, u2] = await batchUnitsView(db(), b.id);
    const before = await countOf(responses);
    const broken = responseFile(u2!.identity, 90).split("\n");
    broken[5] = "2000 abc";
    const msg = await failureText(() => importResponseFiles(db(), [{ name: "good.txt", text: responseFile(u1!.identity, 90) }, { name: "bad.txt", text: broken.join("\n") }], { batchId: b.id, source: "upload" }, actor));
    expect(msg).toMatch(/Nothing was saved/);
    const err = await importResponseFiles(db(), [{ name: "bad.txt", text: broken.join("\n") }], { batchId: b.id, source: "upload" }, actor).catch((e) => e);
    expect(err.fieldErrors.files.join(" ")).toMatch(/bad\.txt, line 6/);
    expect(await countOf(responses)).toBe(before);
  });

  test("Thiele–Small: Qts is derived from Qes and Qms (Qts = Qes·Qms/(Qes+Qms), docs/REFERENCES.md, § Loudspeaker parameters) and a disagreeing Qts is refused", async () => {
    const b = await newBatch(1);
    const [u] = await batchUnitsView(db(), b.id);
    // The worked example of docs/REFERENCES.md, § Loudspeaker parameters: Qes 0.4329, Qms 2.996 → Qts 0.3783 (0.37825 from the rounded inputs).
    await recordMeasurement(db(), { itemId: u!.id, response: null, ts: { fsHz: 37.51, qts: null, qes: 0.4329, qms: 2.996, reOhm: 6, vasL: 30.1, sensitivityDb: 88 } }, actor);
    const [row] = await db().select().from(tsParams).where(eq(tsParams.itemId, u!.id));
    expect(row!.qts).toBeCloseTo(0.37825, 4);
    const msg = await failureText(() => recordMeasurement(db(), { itemId: u!.id, response: null, ts: { fsHz: 37.51, qts: 0.5, qes: 0.4329, qms: 2.996, reOhm: 6, vasL: null, sensitivityDb: null } }, actor));
    expect(msg).toMatch(/parameters need attention/);
  });

  test("a batch CSV of parameters: every row checked, an unknown serial refuses the whole file", async () => {
    const b = await newBatch(2);
    const [u1, u2] = await batchUnitsView(db(), b.id);
    const good = parseTsCsv(`serial;fs;qes;qms;re\n${u1!.identity};900;1,1;2,2;4,7\n${u2!.identity};905;1,12;2,1;4,68`);
    expect(good.ok).toBe(true);
    const before = await countOf(tsParams);
    const bad = parseTsCsv(`serial,fs,qes,qms\n${u1!.identity},900,1.1,2.2\nD-TW-26-99999-0,900,1.1,2.2`);
    if (!bad.ok) throw new Error("the CSV itself is well formed");
    const msg = await importTsRows(db(), bad.rows, { batchId: b.id, source: "csv" }, actor).catch((e) => e);
    expect(msg.fieldErrors.csv.join(" ")).toMatch(/Line 3: D-TW-26-99999-0 is not a unit of this batch/);
    expect(await countOf(tsParams)).toBe(before);
    if (!good.ok) throw new Error("unreachable");
    expect(await importTsRows(db(), good.rows, { batchId: b.id, source: "csv" }, actor)).toBe(2);
    expect(parseTsCsv("serial,fs,colour\nX,1,red")).toMatchObject({ ok: false });
  });
});

describe("matching and reserving", () => {
  async function measuredBatch(levels: number[]) {
    const b = await newBatch(levels.length);
    const units = await batchUnitsView(db(), b.id);
    await importResponseFiles(db(), units.map((u, i) => ({ name: `${u.identity}.txt`, text: responseFile(u.identity, levels[i]!) })), { batchId: b.id, source: "upload" }, actor);
    return { batch: b, units };
  }

  test("the plan pairs the closest units within the model's limit and leaves the odd one out", async () => {
    // Made-up flat responses: 90.0/90.05 and 91.0/91.02 pair up; 95 is far from every other.
    const { batch, units } = await measuredBatch([90, 91, 90.05, 91.02, 95]);
    const view = await matchBatch(db(), { id: batch.id, partType: "tweeter" }, { limitDb: tweeterLimit });
    const pairs = view.plan.pairs.map((p) => [p.a, p.b].sort().join("+")).sort();
    const id = (i: number) => units[i]!.identity;
    expect(pairs).toEqual([[id(0), id(2)].sort().join("+"), [id(1), id(3)].sort().join("+")].sort());
    expect(view.plan.single.map((s) => s.id)).toEqual([id(4)]);
  });

  test("accepting reserves each set once; two acceptances at once: exactly one succeeds and the other names the units", async () => {
    const { batch } = await measuredBatch([90, 90.05, 92, 92.03]);
    const view = await matchBatch(db(), { id: batch.id, partType: "tweeter" }, { limitDb: tweeterLimit });
    const input = { batchId: batch.id, modelId: model.id, pairs: view.plan.pairs.map((p) => ({ a: p.a, b: p.b })) };
    const results = await Promise.allSettled([acceptPlan(db(), input, actor), acceptPlan(db(), input, actor)]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    const refused = results.find((r): r is PromiseRejectedResult => r.status === "rejected")!;
    expect(refused.reason).toBeInstanceOf(UnitsTakenError);
    expect((refused.reason as UnitsTakenError).taken.sort()).toEqual(input.pairs.flatMap((p) => [p.a, p.b]).sort());
    const after = await batchUnitsView(db(), batch.id);
    expect(after.every((u) => u.state === "reserved" && u.setCode)).toBe(true);
  });

  test("the database refuses reserving a unit twice, whatever the code does", async () => {
    const { batch } = await measuredBatch([90, 90.05]);
    const view = await matchBatch(db(), { id: batch.id, partType: "tweeter" }, { limitDb: tweeterLimit });
    await acceptPlan(db(), { batchId: batch.id, modelId: model.id, pairs: view.plan.pairs }, actor);
    const [member] = await db().select().from(setMembers).innerJoin(items, eq(items.id, setMembers.itemId)).where(eq(items.identity, view.plan.pairs[0]!.a));
    const msg = await failureText(() => db().insert(setMembers).values({ setId: member!.set_members.setId, itemId: member!.set_members.itemId, side: "L" }));
    expect(msg).toMatch(/UNIQUE/);
  });

  test("a pair over the limit is refused at acceptance even if a browser sends it", async () => {
    const { batch, units } = await measuredBatch([90, 93]);
    const msg = await failureText(() => acceptPlan(db(), { batchId: batch.id, modelId: model.id, pairs: [{ a: units[0]!.identity, b: units[1]!.identity }] }, actor));
    expect(msg).toMatch(/over the .* dB limit/);
  });

  test("a failed unit is not matched and says why", async () => {
    const { batch, units } = await measuredBatch([90, 90.01, 90.02]);
    await failUnit(db(), { itemId: units[2]!.id, reason: "rub at 2 kHz" }, actor);
    const view = await matchBatch(db(), { id: batch.id, partType: "tweeter" }, { limitDb: tweeterLimit });
    expect(view.notReady).toEqual([{ identity: units[2]!.identity, reason: "failed on the bench" }]);
    expect(view.plan.pairs).toHaveLength(1);
  });
});
