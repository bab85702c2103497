import { eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { items, models, modelTolerances, responses, setMembers, tsParams, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { acceptPlan, batchUnitsView, failUnit, importResponseFiles, importTsCsv, importTsRows, listBatches, matchBatch, matchReadiness, recordMeasurement, registerBatch, UnitsTakenError } from "@/lib/lab/units";
import { UNIT_CLASSES } from "@/lib/lab/unit-counts";
import { changeState } from "@/lib/genealogy/graph";
import { AppError } from "@/lib/auth/errors";
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

  test("a batch CSV of parameters: good rows are saved together, in one go", async () => {
    const b = await newBatch(2);
    const [u1, u2] = await batchUnitsView(db(), b.id);
    const before = await countOf(tsParams);
    expect(await importTsCsv(db(), `serial;fs;qes;qms;re\n${u1!.identity};900;1,1;2,2;4,7\n${u2!.identity};905;1,12;2,1;4,68`, { batchId: b.id }, actor)).toBe(2);
    expect(await countOf(tsParams)).toBe(before + 2);
  });

  test("a batch CSV with problems in several rows and fields reports every one of them at once, with unknown serials, and saves nothing", async () => {
    const b = await registerBatch(db(), { partType: "tweeter", partNumber: "T-TEST", maker: "Test maker", lot: "L-CSV", receivedOn: "2026-11-30", makerSerials: ["CSV-1", "CSV-2", "CSV-3"], count: 0 }, actor);
    const [u1] = await batchUnitsView(db(), b.id);
    const before = await countOf(tsParams);
    const csv = [
      "serial,fs,qts,qes,qms,re,colour",
      `CSV-1,900,,1.1,2.2,4.7,red`, // good, but the file has an unknown column
      `CSV-2,abc,0.5,1.1,2.2,0.1,red`, // Fs not a number; Qts disagrees with Qes and Qms; Re out of range
      "",
      `NOT-A-UNIT,900,,1.1,2.2,4.7,red`, // unknown serial (line 5: the empty line counts)
      `${u1!.identity},910,,1.1,2.2,4.7,red`, // CSV-1 again, under its Twinleaf serial
      `,900,,,,,`, // no serial
      `CSV-3,0,,,,,`, // Fs out of range
    ].join("\n");
    const e = await importTsCsv(db(), csv, { batchId: b.id }, actor).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(AppError);
    const err = e as AppError;
    expect(err.status).toBe(400);
    expect(err.fieldErrors?.csv).toEqual([
      'Line 1: unknown column "colour"; the columns are serial,fs,qts,qes,qms,re,vas,sensitivity.',
      'Line 3: Fs "abc" is not a number.',
      "Line 3 (CSV-2): Qts 0.5 does not agree with Qes and Qms: Qes·Qms/(Qes+Qms) = 0.7333, and a Qts more than 2 % away from that is refused. Check Qts, Qes and Qms, or leave Qts empty to have it worked out.",
      "Line 3 (CSV-2): Re (Ω) must be between 0.5 and 100 Ω; 0.1 looks mistyped.",
      "Line 5: NOT-A-UNIT is not a unit of this batch.",
      `Line 6 (${u1!.identity}): ${u1!.identity} is also on line 2; give each unit one row.`,
      "Line 7: no serial: give the unit's Twinleaf serial or the maker's.",
      "Line 8 (CSV-3): Fs (Hz) must be between 5 and 40000 Hz; 0 looks mistyped.",
    ]);
    expect(err.message).toBe("Nothing was saved: 8 problems in the columns and 5 rows. Correct them all and bring the file in again.");
    expect(await countOf(tsParams)).toBe(before);
  });

  test("the bench's JSON parameters are checked the same way: every problem at once, nothing saved", async () => {
    const b = await newBatch(1);
    const [u] = await batchUnitsView(db(), b.id);
    const before = await countOf(tsParams);
    const e = (await importTsRows(db(), [
      { line: 1, serial: u!.identity, ts: { fsHz: 2, qts: null, qes: null, qms: null, reOhm: 200, vasL: null, sensitivityDb: null } },
      { line: 2, serial: "D-TW-26-99999-0", ts: { fsHz: 900, qts: null, qes: null, qms: null, reOhm: null, vasL: null, sensitivityDb: null } },
    ], { batchId: b.id, source: "api" }, actor).catch((x: unknown) => x)) as AppError;
    expect(e.fieldErrors?.csv).toEqual([
      `Line 1 (${u!.identity}): Fs (Hz) must be between 5 and 40000 Hz; 2 looks mistyped.`,
      `Line 1 (${u!.identity}): Re (Ω) must be between 0.5 and 100 Ω; 200 looks mistyped.`,
      "Line 2: D-TW-26-99999-0 is not a unit of this batch.",
    ]);
    expect(await countOf(tsParams)).toBe(before);
  });

  test("a batch whose number of units disagrees with the serials scanned is refused and nothing is written", async () => {
    const before = Number((await db().select({ n: sql<number>`count(*)` }).from(items))[0]!.n);
    const msg = await failureText(() => registerBatch(db(), { partType: "tweeter", partNumber: "T-TEST", maker: "Test maker", lot: "L-N", receivedOn: "2026-11-30", makerSerials: ["N1", "N2", "N3", "N4", "N5", "N6"], count: 5 }, actor));
    expect(msg).toBe("Nothing was registered: The number of units is 5, but 6 makers' serials are scanned. Leave the number empty to register one unit per serial, or check the list.");
    expect(Number((await db().select({ n: sql<number>`count(*)` }).from(items))[0]!.n)).toBe(before);
    // The same number as serials is no disagreement.
    const b = await registerBatch(db(), { partType: "tweeter", partNumber: "T-TEST", maker: "Test maker", lot: "L-N", receivedOn: "2026-11-30", makerSerials: ["N1", "N2"], count: 2 }, actor);
    expect(b.units).toHaveLength(2);
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

  test("matching is not offered when no two units are within the limit, and the page is told why, with the band by its name", async () => {
    // Two invented flat responses, the second 1.43 dB louder in the 2 kHz band only (IEC 61260-1 edges 1778.28–2238.72 Hz).
    const b = await newBatch(2);
    const units = await batchUnitsView(db(), b.id);
    const bumped = (serial: string, bump: number) =>
      responseFile(serial, 90)
        .split("\n")
        .map((l) => {
          const [hz, level, phase] = l.split("\t");
          return phase !== undefined && Number(hz) >= 1778.28 && Number(hz) < 2238.72 ? `${hz}\t${(Number(level) + bump).toFixed(3)}\t${phase}` : l;
        })
        .join("\n");
    await importResponseFiles(db(), units.map((u, i) => ({ name: `${u.identity}.txt`, text: bumped(u.identity, i === 1 ? 1.43 : 0) })), { batchId: b.id, source: "upload" }, actor);
    const r = await matchReadiness(db(), { id: b.id, partType: "tweeter" });
    // Every demo model allows tweeters 0.5 dB apart (the seed's model tolerances).
    expect(r).toEqual({ free: 2, quarantined: 0, canMatch: false, why: `No two of the 2 measured units are within the 0.5 dB limit: the closest two, ${units[0]!.identity} and ${units[1]!.identity}, differ by 1.43 dB at 2 kHz.` });

    const close = await measuredBatch([90, 90.05]);
    expect(await matchReadiness(db(), { id: close.batch.id, partType: "tweeter" })).toEqual({ free: 2, quarantined: 0, canMatch: true, why: null });
  });

  test("a batch's columns add up to its units: waiting, measured and free, reserved, fitted, failed and other", async () => {
    const { batch, units } = await measuredBatch([90, 90.02, 90.04, 93, 95, 97]);
    // Another batch whose one unit waits for measurement, so every class is somewhere in the list.
    await registerBatch(db(), { partType: "tweeter", partNumber: "T-TEST", maker: "Test maker", lot: "L1", receivedOn: "2026-11-30", makerSerials: [], count: 1 }, actor);
    const view = await matchBatch(db(), { id: batch.id, partType: "tweeter" }, { limitDb: tweeterLimit });
    await acceptPlan(db(), { batchId: batch.id, modelId: model.id, pairs: [view.plan.pairs[0]!] }, actor);
    await failUnit(db(), { itemId: units[3]!.id, reason: "buzz at 3 kHz" }, actor);
    // A unit fitted outside a set (as a service replacement is) and one scrapped: the states the lab does not set itself.
    await changeState(db(), (await db().select().from(items).where(eq(items.id, units[4]!.id)))[0]!, "fitted", { actorId: actor.id, station: "lab" });
    await changeState(db(), (await db().select().from(items).where(eq(items.id, units[5]!.id)))[0]!, "scrapped", { actorId: actor.id, station: "lab", reason: "dropped" });

    const all = await listBatches(db());
    for (const b of all) expect(UNIT_CLASSES.reduce((sum, c) => sum + b[c], 0)).toBe(b.units);
    const mine = all.find((b) => b.id === batch.id)!;
    expect(mine).toMatchObject({ units: 6, waiting: 0, free: 1, reserved: 2, fitted: 1, failed: 1, other: 1 });
  });

  test("a failed unit is not matched and says why", async () => {
    const { batch, units } = await measuredBatch([90, 90.01, 90.02]);
    await failUnit(db(), { itemId: units[2]!.id, reason: "rub at 2 kHz" }, actor);
    const view = await matchBatch(db(), { id: batch.id, partType: "tweeter" }, { limitDb: tweeterLimit });
    expect(view.notReady).toEqual([{ identity: units[2]!.identity, reason: "failed on the bench" }]);
    expect(view.plan.pairs).toHaveLength(1);
  });
});
