/**
 * Correcting a mistyped route reading (lib/route/corrections.ts): appended beside the record,
 * never over it; the window check runs again; a slip's nonconformance closes as an entry error by
 * quality. Windows are the demo route's (lib/route/default-spec.ts, common practice).
 */
import { and, eq, sql } from "drizzle-orm";
import { afterEach, beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { events, finishes, items, models, nonconformances, routeCorrections, routeRecords, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { setClock } from "@/lib/clock";
import { epcisDocumentForItem } from "@/lib/genealogy/epcis";
import { itemByIdentity } from "@/lib/genealogy/graph";
import { raiseContainment } from "@/lib/containments";
import { traceForward } from "@/lib/genealogy/trace";
import { correctRecord, correctionsOf } from "@/lib/route/corrections";
import { defaultRoute } from "@/lib/route/default-spec";
import { readingsAtStation } from "@/lib/route/readings";
import { dispositionNc } from "@/lib/route/nonconformances";
import { OutOfWindowUnconfirmed, pairRoute, recordStep } from "@/lib/route/pair-route";
import { checkReadings, outOfWindowConfirmation } from "@/lib/route/rules";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { goodReadings } from "../fixtures/route";
import { failureText } from "./helpers";

const db = () => getDb();
let cabinetUser = "";
let otherCabinetUser = "";
let qualityUser = "";
let model: typeof models.$inferSelect;

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const byEmail = async (e: string) => (await db().select().from(users).where(eq(users.email, e)))[0]!.id;
  cabinetUser = await byEmail("cabinet@demo.twinleaf.test");
  qualityUser = await byEmail("quality@demo.twinleaf.test");
  // A second person of the cabinet shop: the veneer role's user stands in (only the id differs here).
  otherCabinetUser = await byEmail("veneer@demo.twinleaf.test");
  model = (await db().select().from(models)).find((m) => m.leavesPerFace === 2)!;
});
afterEach(() => setClock(null));

const T0 = new Date("2026-12-08T08:00:00Z");
const HOUR = 3_600_000;
const at = (h: number) => new Date(T0.getTime() + h * HOUR);

async function newPair() {
  const veneerUser = otherCabinetUser;
  const walnut = (await db().select().from(finishes)).find((f) => f.kind === "veneer")!;
  const flitch = await receiveFlitch(db(), { finishId: walnut.id, logReference: "R", supplier: "S", receivedOn: "2026-11-01", leafThicknessMm: 0.6, leafCount: 4 }, { id: veneerUser });
  const view = (await flitchView(db(), flitch.identity))!;
  for (const l of view.leaves) await measureLeaf(db(), l.id, { lengthMm: 900, widthMm: 300, usable: true }, { id: veneerUser });
  const [made] = await confirmRuns(db(), { flitchId: flitch.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, { id: veneerUser });
  return made!.pair;
}

async function step(pairId: string, key: string, when: Date, readings: Record<string, string | boolean> = goodReadings(key)) {
  setClock(when);
  const s = defaultRoute().find((x) => x.key === key)!;
  const checked = checkReadings(s, readings);
  return recordStep(db(), { pairId, seq: s.seq, sides: ["L", "R"], startedAt: when, readings, confirmOutOfWindow: checked.ok ? outOfWindowConfirmation(checked.outOfWindow) : null }, { id: cabinetUser });
}

/** A pair through its first coat, the coat's wet film typed 1000 µm for 100 µm: the slip opens a nonconformance. */
async function pairWithSlip() {
  const pair = await newPair();
  await step(pair.id, "press", at(0));
  await step(pair.id, "trim", at(1));
  await step(pair.id, "brace", at(2));
  await step(pair.id, "sanding", at(6));
  await step(pair.id, "check-sanding", at(7));
  const coat = await step(pair.id, "coat-1", at(8), { coat: "1", lacquerLot: "LQ-2612-07", ovenC: "52", wetFilmUm: "1000" });
  expect(coat.nc).not.toBeNull();
  return { pair, recordId: coat.recordId, nc: coat.nc! };
}

const counts = async () => ({
  corrections: Number((await db().get<{ n: number }>(sql`SELECT count(*) AS n FROM route_corrections`))!.n),
  events: Number((await db().get<{ n: number }>(sql`SELECT count(*) AS n FROM events`))!.n),
  ncs: Number((await db().get<{ n: number }>(sql`SELECT count(*) AS n FROM nonconformances`))!.n),
});
const cabinetShop = (id: string) => ({ id, mayCorrectAny: false, mayCorrectOwn: true });
const quality = { id: "", mayCorrectAny: true, mayCorrectOwn: true };

describe("bad input writes nothing", () => {
  test.each([
    ["no reason", { reason: "  " }, /Say why the reading is corrected/],
    ["an unknown record", { recordId: 99_999_999 }, /not in this pair's route/],
    ["an unchanged value", { readings: { wetFilmUm: "1000" } }, /Nothing changed/],
    ["a value that is not a number", { readings: { wetFilmUm: "1OO" } }, /Some readings need attention/],
    ["a start after the record was made", { startedAt: at(30) }, /starts before it is recorded/],
  ])("%s", async (_what, change, message) => {
    const { pair, recordId } = await pairWithSlip();
    setClock(at(9));
    const before = await counts();
    const input = { pairId: pair.id, recordId, readings: { wetFilmUm: "100" }, reason: "Typed 1000 for 100 on the film gauge.", ...change };
    expect(await failureText(() => correctRecord(db(), input, cabinetShop(cabinetUser)))).toMatch(message);
    expect(await counts()).toEqual(before);
  });

  test("someone else of the cabinet shop may not correct it; quality may", async () => {
    const { pair, recordId } = await pairWithSlip();
    setClock(at(9));
    const before = await counts();
    const input = { pairId: pair.id, recordId, readings: { wetFilmUm: "100" }, reason: "Typed 1000 for 100 on the film gauge." };
    expect(await failureText(() => correctRecord(db(), input, cabinetShop(otherCabinetUser)))).toMatch(/by the person who recorded it, or by quality/);
    expect(await counts()).toEqual(before);
    await expect(correctRecord(db(), input, { ...quality, id: qualityUser })).resolves.toMatchObject({ opened: null });
  });
});

describe("a correction reruns the window check", () => {
  test("the slip corrected: the record stays, the correction reads 100 µm, and quality closes the nonconformance as an entry error", async () => {
    const { pair, recordId, nc } = await pairWithSlip();
    setClock(at(9));
    // Quality cannot close it as an entry error before the reading is corrected.
    const [open] = await db().select().from(nonconformances).where(eq(nonconformances.code, nc));
    expect(await failureText(() => dispositionNc(db(), { ncId: open!.id, disposition: "entry_error", reason: "Mistyped film reading." }, { id: qualityUser }))).toMatch(/closes as an entry error only once a correction/);

    const r = await correctRecord(db(), { pairId: pair.id, recordId, readings: { wetFilmUm: "100" }, reason: "Typed 1000 for 100 on the film gauge." }, cabinetShop(cabinetUser));
    expect(r).toMatchObject({ opened: null, entryError: nc });
    // The record is as it was written; the route reads the correction.
    const [record] = await db().select().from(routeRecords).where(eq(routeRecords.id, recordId));
    expect(record!.readings.wetFilmUm).toBe(1000);
    const route = await pairRoute(db(), (await db().select().from(items).where(eq(items.id, pair.id)))[0]!);
    expect(route.records.find((x) => x.id === recordId)!.readings).toEqual({ coat: 1, lacquerLot: "LQ-2612-07", ovenC: 52, wetFilmUm: 100 });
    const shown = await correctionsOf(db(), pair.id);
    expect(shown).toHaveLength(1);
    expect(shown[0]).toMatchObject({ before: { wetFilmUm: 1000 }, readings: { wetFilmUm: 100 }, changed: ["wetFilmUm"], reason: "Typed 1000 for 100 on the film gauge." });

    // Each cabinet's correction names the event it corrects, with the reason.
    const corrected = await db().select().from(events).where(and(eq(events.type, "route.step_corrected"), sql`json_extract(${events.data}, '$.recordId') = ${recordId}`));
    expect(corrected).toHaveLength(2);
    for (const e of corrected) {
      const [orig] = await db().select().from(events).where(eq(events.id, e.correctsId!));
      expect(orig).toMatchObject({ type: "route.step_recorded", subjectId: e.subjectId });
      expect(e.reason).toBe("Typed 1000 for 100 on the film gauge.");
    }

    // "Every coat at the lacquer booth that day" reads the corrected film too.
    const booth = await readingsAtStation(db(), { station: "lacquer", from: "2026-12-08", to: "2026-12-08" });
    expect(booth.find((b) => b.recordId === recordId)).toMatchObject({ readings: { wetFilmUm: 100, lacquerLot: "LQ-2612-07" }, outOfWindow: false });

    // The pair is still held until quality closes the slip's nonconformance.
    expect(route.position.openNcs).toEqual([nc]);
    await dispositionNc(db(), { ncId: open!.id, disposition: "entry_error", reason: "The gauge read 100 µm; 1000 was a typing slip, corrected." }, { id: qualityUser });
    const [closed] = await db().select().from(nonconformances).where(eq(nonconformances.code, nc));
    expect(closed).toMatchObject({ disposition: "entry_error", approvedBy: qualityUser });
    const after = await pairRoute(db(), (await db().select().from(items).where(eq(items.id, pair.id)))[0]!, at(10));
    expect(after.position.openNcs).toEqual([]);
    expect(after.position.cabinets.map((c) => c.next?.key)).toEqual(["coat-2", "coat-2"]);
  });

  test("a correction that brings a reading out of its window asks first, then opens a nonconformance", async () => {
    const pair = await newPair();
    await step(pair.id, "press", at(0));
    const rec = await step(pair.id, "trim", at(1));
    setClock(at(2));
    const input = { pairId: pair.id, recordId: rec.recordId, readings: { deviationMm: "0.25" }, reason: "Read the gauge again: it was 0.25 mm." };
    const before = await counts();
    const asked = await correctRecord(db(), input, cabinetShop(cabinetUser)).catch((e: unknown) => e);
    expect(asked).toBeInstanceOf(OutOfWindowUnconfirmed);
    expect(await counts()).toEqual(before);
    const r = await correctRecord(db(), { ...input, confirmOutOfWindow: (asked as OutOfWindowUnconfirmed).confirmation }, cabinetShop(cabinetUser));
    expect(r.opened).toMatch(/^NC-/);
    const [opened] = await db().select().from(nonconformances).where(eq(nonconformances.code, r.opened!));
    expect(opened!.finding).toBe("Trim deviation 0.25 mm (window ±0.2 mm), after a correction");
    // Quality may not call it an entry error: the corrected record is out of its window.
    expect(await failureText(() => dispositionNc(db(), { ncId: opened!.id, disposition: "entry_error", reason: "No slip here." }, { id: qualityUser }))).toMatch(/entry error only once/);
  });

  test("a corrected start moves the hold after the step", async () => {
    const pair = await newPair();
    await step(pair.id, "press", at(0));
    await step(pair.id, "trim", at(1));
    const brace = await step(pair.id, "brace", at(2));
    setClock(at(3));
    // The brace was recorded at 10:00 as started then; the clamps really went on 30 minutes before,
    // so the 4 h hold counted from the start ends at 13:30, not 14:00.
    await correctRecord(db(), { pairId: pair.id, recordId: brace.recordId, readings: {}, startedMinutesBefore: 30, reason: "The clamps went on at 09:30, not 10:00." }, cabinetShop(cabinetUser));
    const route = await pairRoute(db(), (await db().select().from(items).where(eq(items.id, pair.id)))[0]!, at(3));
    expect(route.position.cabinets[0]!.holdUntil).toEqual(at(5.5));
  });
});

test("the database refuses to change or delete a correction", async () => {
  const { pair, recordId } = await pairWithSlip();
  setClock(at(9));
  await correctRecord(db(), { pairId: pair.id, recordId, readings: { wetFilmUm: "100" }, reason: "Typed 1000 for 100 on the film gauge." }, cabinetShop(cabinetUser));
  const [row] = await db().select().from(routeCorrections).where(eq(routeCorrections.recordId, recordId));
  // Drizzle wraps the database's refusal; its own words are in the cause.
  const refusal = (q: Promise<unknown>) => q.then(() => "accepted", (e: Error & { cause?: Error }) => `${e.message} ${e.cause?.message ?? ""}`);
  expect(await refusal(db().run(sql`UPDATE route_corrections SET reason = 'changed afterwards' WHERE id = ${row!.id}`))).toMatch(/never by changing it/);
  expect(await refusal(db().run(sql`DELETE FROM route_corrections WHERE id = ${row!.id}`))).toMatch(/never deleted/);
  expect(await refusal(db().run(sql`UPDATE route_records SET readings = '{}' WHERE id = ${recordId}`))).toMatch(/appended, never changed/);
  expect((await db().select().from(routeCorrections).where(eq(routeCorrections.id, row!.id)))[0]!.reason).toBe("Typed 1000 for 100 on the film gauge.");
});

test("the EPCIS export declares the original step in error and carries the corrective event", async () => {
  const { pair, recordId } = await pairWithSlip();
  setClock(at(9));
  await correctRecord(db(), { pairId: pair.id, recordId, readings: { wetFilmUm: "100" }, reason: "Typed 1000 for 100 on the film gauge." }, cabinetShop(cabinetUser));
  const [cab] = await db().select().from(events).where(and(eq(events.type, "route.step_corrected"), sql`json_extract(${events.data}, '$.recordId') = ${recordId}`)).limit(1);
  const cabinet = (await db().select().from(items).where(eq(items.id, cab!.subjectId)))[0]!;
  const doc = await epcisDocumentForItem(db(), cabinet.id, { baseUri: "https://twinleaf.test" });
  const list = doc.epcisBody.eventList as Record<string, unknown>[];
  const declared = list.find((e) => e.errorDeclaration && e.eventID === `https://twinleaf.test/events/${cab!.correctsId}`);
  const corrective = list.find((e) => e.eventID === `https://twinleaf.test/events/${cab!.id}`);
  expect(declared?.errorDeclaration).toMatchObject({ reason: "incorrect_data", correctiveEventIDs: [corrective?.eventID] });
  // The corrective event carries the corrected film reading as sensor data (EPCIS 2.0 sensorElementList).
  expect(JSON.stringify(corrective?.sensorElementList)).toContain('"value":100');
});

describe("the lacquer lot is traced", () => {
  test("a coat's lot sits in both cabinets at LACQ-1, so its forward trace reaches the pair; a corrected lot moves", async () => {
    const { pair, recordId } = await pairWithSlip();
    const lot = (await itemByIdentity(db(), "LQ-2612-07"))!;
    expect(lot.kind).toBe("supplier_lot");
    const reached = await traceForward(db(), lot.id);
    expect(reached.map((n) => n.identity)).toContain(pair.identity);
    setClock(at(9));
    // The lot was mistyped too: the cabinets now hold the corrected lot, and the wrong one no longer reaches the pair.
    await correctRecord(db(), { pairId: pair.id, recordId, readings: { wetFilmUm: "100", lacquerLot: "lq-2612-08" }, reason: "Wrong drum label read; film typed 1000 for 100." }, cabinetShop(cabinetUser));
    const right = (await itemByIdentity(db(), "LQ-2612-08"))!;
    expect((await traceForward(db(), right.id)).map((n) => n.identity)).toContain(pair.identity);
    expect((await traceForward(db(), lot.id)).map((n) => n.identity)).not.toContain(pair.identity);
    const record = (await pairRoute(db(), (await db().select().from(items).where(eq(items.id, pair.id)))[0]!)).records.find((r) => r.id === recordId)!;
    // The reading keeps the lot as it was written.
    expect(record.readings.lacquerLot).toBe("lq-2612-08");
  });

  test("a containment raised on the lacquer lot holds the pair that was coated from it", async () => {
    const { pair } = await pairWithSlip();
    const raised = await raiseContainment(db(), { target: "lq-2612-07", reason: "The maker recalled this drum: cloudy film.", severity: "major" }, { id: qualityUser });
    expect(raised.affected.map((a) => [a.identity, a.group])).toContainEqual([pair.identity, "in_build"]);
    setClock(at(9));
    expect(await failureText(() => step(pair.id, "coat-2", at(10)))).toMatch(new RegExp(raised.code));
  });

  test("a lot typed as a cabinet's serial is refused beside its field, and nothing is written", async () => {
    const pair = await newPair();
    for (const [key, h] of [["press", 0], ["trim", 1], ["brace", 2], ["sanding", 6], ["check-sanding", 7]] as const) await step(pair.id, key, at(h));
    const cabinet = (await db().select().from(items).where(eq(items.kind, "cabinet")).limit(1))[0]!;
    const before = await counts();
    expect(await failureText(() => step(pair.id, "coat-1", at(8), { coat: "1", lacquerLot: cabinet.identity, ovenC: "52", wetFilmUm: "100" }))).toMatch(/Some readings need attention/);
    expect(await counts()).toEqual(before);
  });
});
