/**
 * The register's one clock (lib/clock.ts): everything a write function does inside `atTime(t, …)`
 * is stamped t (items, links, leaf allocations, route records, batches, measurements, sets and
 * every event); outside it, the clock's own now (set by a test, or the system's).
 */
import { eq, gt, inArray, sql } from "drizzle-orm";
import { afterEach, beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { events, finishes, items, leafAllocations, links, matchedSets, models, responses, routeRecords, tsParams, unitBatches, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { atTime, now, setClock } from "@/lib/clock";
import { changeState } from "@/lib/genealogy/graph";
import { acceptPlan, importResponseFiles, importTsRows, registerBatch } from "@/lib/lab/units";
import { recordStep } from "@/lib/route/pair-route";
import { confirmRuns, importLeafRows, receiveFlitch } from "@/lib/veneer/flitches";
import { goodReadings } from "../fixtures/route";

const db = () => getDb();
const actors: Record<string, { id: string }> = {};
let model: typeof models.$inferSelect;
let walnut: typeof finishes.$inferSelect;

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  for (const u of await db().select().from(users)) actors[u.email.split("@")[0]!] = { id: u.id };
  model = (await db().select().from(models).where(eq(models.code, "PW2")))[0]!;
  walnut = (await db().select().from(finishes).where(eq(finishes.code, "WAL")))[0]!;
});
afterEach(() => setClock(null));

/** An invented flat response, 1/12 octave from 20 Hz to 20 kHz, naming its unit on the first line. */
const flat = (serial: string) => [`# ${serial}`, ...Array.from({ length: 121 }, (_, k) => `${(20 * 2 ** (k / 12)).toFixed(2)} 90`)].join("\n");

const lastEventId = async () => Number((await db().all<{ id: number | null }>(sql`SELECT max(id) AS id FROM events`))[0]?.id ?? 0);

/** A flitch received, its leaves measured, one run confirmed into a pair, and the pair pressed. */
async function veneerAndPress(day: string) {
  const flitch = await receiveFlitch(db(), { finishId: walnut.id, logReference: "LOG-CLOCK", supplier: "Clock test", receivedOn: day, leafThicknessMm: 0.6, leafCount: 4 }, actors.veneer!);
  await importLeafRows(db(), flitch.id, [1, 2, 3, 4].map((seq) => ({ seq, lengthMm: 900, widthMm: 300, usable: true, defect: null })), actors.veneer!);
  const [made] = await confirmRuns(db(), { flitchId: flitch.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, actors.veneer!);
  await recordStep(db(), { pairId: made!.pair.id, seq: 1, sides: ["L", "R"], startedAt: new Date(now().getTime() - 20 * 60_000), readings: goodReadings("press") }, actors.cabinet!);
  return { flitch, ...made! };
}

/** A batch of two tweeters registered, measured and matched into one set. */
async function measureAndMatch(day: string) {
  const batch = await registerBatch(db(), { partType: "tweeter", partNumber: "CLOCK-1", maker: "Invented maker", lot: "L-CLOCK", receivedOn: day, makerSerials: [], count: 2 }, actors.lab!);
  await importResponseFiles(db(), batch.units.map((u) => ({ name: `${u.identity}.txt`, text: flat(u.identity) })), { batchId: batch.id, source: "upload" }, actors.lab!);
  const ts = { fsHz: 900, qts: null, qes: 1.1, qms: 2.2, reOhm: 4.7, vasL: null, sensitivityDb: 90 };
  await importTsRows(db(), batch.units.map((u, i) => ({ line: i + 2, serial: u.identity, ts })), { batchId: batch.id, source: "csv" }, actors.lab!);
  const [set] = await acceptPlan(db(), { batchId: batch.id, modelId: model.id, pairs: [{ a: batch.units[0]!.identity, b: batch.units[1]!.identity }] }, actors.lab!);
  return { batch, set: set! };
}

describe("atTime", () => {
  test("every row and event a write makes inside atTime(t, …) is stamped t", async () => {
    const t = new Date("2024-05-06T07:08:09.123Z");
    const before = await lastEventId();
    const { flitch, pair, left, right } = await atTime(t, () => veneerAndPress("2024-05-06"));
    const lab = await atTime(t, () => measureAndMatch("2024-05-06"));

    const written = await db().select({ at: events.at }).from(events).where(gt(events.id, before));
    expect(written.length).toBeGreaterThan(30);
    expect(new Set(written.map((e) => e.at.getTime()))).toEqual(new Set([t.getTime()]));

    const ids = [flitch.id, pair.id, left.id, right.id, ...lab.batch.units.map((u) => u.id)];
    const made = await db().select({ createdAt: items.createdAt }).from(items).where(inArray(items.id, ids));
    expect(made.map((i) => i.createdAt)).toEqual(Array(ids.length).fill(t));
    // Serials carry the year of the time the thing was registered, not of the day the test runs.
    expect(pair.identity).toMatch(/^P-PW2-24-/);
    const fitted = await db().select({ startedAt: links.startedAt }).from(links).where(inArray(links.parentId, [pair.id, left.id, right.id]));
    expect(fitted.length).toBe(6);
    expect(fitted.every((l) => l.startedAt.getTime() === t.getTime())).toBe(true);
    const faces = await db().select({ startedAt: leafAllocations.startedAt }).from(leafAllocations).where(eq(leafAllocations.pairId, pair.id));
    expect(faces.map((a) => a.startedAt)).toEqual(Array(4).fill(t));
    const [record] = await db().select().from(routeRecords).where(eq(routeRecords.pairId, pair.id));
    expect(record).toMatchObject({ recordedAt: t, startedAt: new Date(t.getTime() - 20 * 60_000) });

    const [batchRow] = await db().select({ createdAt: unitBatches.createdAt }).from(unitBatches).where(eq(unitBatches.id, lab.batch.id));
    expect(batchRow!.createdAt).toEqual(t);
    const unitIds = lab.batch.units.map((u) => u.id);
    expect((await db().select({ at: responses.createdAt }).from(responses).where(inArray(responses.itemId, unitIds))).map((r) => r.at)).toEqual([t, t]);
    expect((await db().select({ at: tsParams.createdAt }).from(tsParams).where(inArray(tsParams.itemId, unitIds))).map((r) => r.at)).toEqual([t, t]);
    const [set] = await db().select({ createdAt: matchedSets.createdAt }).from(matchedSets).where(eq(matchedSets.code, lab.set.code));
    expect(set!.createdAt).toEqual(t);
  });

  test("outside atTime a write takes the clock's now: the time a test set, else the system's", async () => {
    const set = new Date("2025-09-10T11:12:13.000Z");
    setClock(set);
    let before = await lastEventId();
    const { pair } = await veneerAndPress("2025-09-10");
    const stamped = await db().select({ at: events.at }).from(events).where(gt(events.id, before));
    expect(new Set(stamped.map((e) => e.at.getTime()))).toEqual(new Set([set.getTime()]));
    expect((await db().select().from(items).where(eq(items.id, pair.id)))[0]!.createdAt).toEqual(set);

    setClock(null);
    const from = Date.now();
    before = await lastEventId();
    const { batch } = await measureAndMatch(new Date().toISOString().slice(0, 10));
    const to = Date.now();
    const times = [
      ...(await db().select({ at: events.at }).from(events).where(gt(events.id, before))).map((e) => e.at),
      ...(await db().select({ at: items.createdAt }).from(items).where(inArray(items.id, batch.units.map((u) => u.id)))).map((i) => i.at),
    ];
    expect(times.length).toBeGreaterThan(8);
    for (const at of times) {
      expect(at.getTime()).toBeGreaterThanOrEqual(from);
      expect(at.getTime()).toBeLessThanOrEqual(to);
    }
  });

  test("two writes at once, each in its own atTime, keep their own times; the clock reads as before afterwards", async () => {
    setClock(new Date("2026-01-02T03:04:05.000Z"));
    const [a, b] = [new Date("2023-03-01T09:00:00Z"), new Date("2023-04-01T09:00:00Z")];
    const units = (await registerBatch(db(), { partType: "bass", partNumber: "CLOCK-2", maker: "Invented maker", lot: "L-CLOCK-2", receivedOn: "2026-01-02", makerSerials: [], count: 2 }, actors.lab!)).units;
    const before = await lastEventId();
    // Both run interleaved: each awaits the database many times while the other goes on.
    await Promise.all([
      atTime(a, async () => {
        for (let i = 0; i < 3; i++) await db().transaction((tx) => changeState(tx, { ...units[0]! }, `state-${i}`, { actorId: actors.lab!.id, station: "lab" }));
      }),
      atTime(b, async () => {
        for (let i = 0; i < 3; i++) await db().transaction((tx) => changeState(tx, { ...units[1]! }, `state-${i}`, { actorId: actors.lab!.id, station: "lab" }));
      }),
    ]);
    const rows = await db().select({ subjectId: events.subjectId, at: events.at }).from(events).where(gt(events.id, before));
    expect(rows).toHaveLength(6);
    for (const r of rows) expect(r.at).toEqual(r.subjectId === units[0]!.id ? a : b);
    expect(now()).toEqual(new Date("2026-01-02T03:04:05.000Z"));
  });

  test("a date that is not a date is refused before anything runs", () => {
    let ran = false;
    expect(() =>
      atTime(new Date("not a date"), async () => {
        ran = true;
      }),
    ).toThrow(/valid date/);
    expect(ran).toBe(false);
  });
});
