/**
 * Everything suspect is traceable: a drive-unit batch, its maker's lot and a flitch reach the
 * speakers and pairs that hold them; route steps are selected by station and window; maker
 * serials and maker lots are found by the register's search.
 */
import { eq, sql } from "drizzle-orm";
import { afterEach, beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { finishes, items, models, users, type Item } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { AppError } from "@/lib/auth/errors";
import { setClock } from "@/lib/clock";
import { affectedByItem } from "@/lib/containments/affected";
import { createItem, fit, itemByIdentity } from "@/lib/genealogy/graph";
import { traceBackward, traceForward } from "@/lib/genealogy/trace";
import { registerBatch } from "@/lib/lab/units";
import { readingsAtStation } from "@/lib/route/readings";
import { pairRoute, recordStep } from "@/lib/route/pair-route";
import { checkReadings, outOfWindowConfirmation } from "@/lib/route/rules";
import { search } from "@/lib/search/search";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { goodReadings } from "../fixtures/route";

const db = () => getDb();
const userId = async (email: string) => (await db().select().from(users).where(eq(users.email, email)))[0]!.id;
let lab = { id: "" };
let veneer = { id: "" };
let cabinet = { id: "" };

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  lab = { id: await userId("lab@demo.twinleaf.test") };
  veneer = { id: await userId("veneer@demo.twinleaf.test") };
  cabinet = { id: await userId("cabinet@demo.twinleaf.test") };
});
afterEach(() => setClock(null));

/** A speaker in a pair holding `parts`, fitted by hand (assembly's checks are tested elsewhere). */
async function speakerWith(tag: string, parts: Item[]) {
  return db().transaction(async (tx) => {
    const by = { actorId: null, station: "assembly" as const };
    const pair = await createItem(tx, { kind: "pair", identity: `P-TR-${tag}`, state: "in_assembly" }, by);
    const speaker = await createItem(tx, { kind: "speaker", identity: `S-TR-${tag}`, state: "built" }, by);
    for (const [i, p] of parts.entries()) await fit(tx, { parent: speaker, child: p, position: `T${i + 1}` }, by);
    await fit(tx, { parent: pair, child: speaker, position: "L" }, by);
    return { pair, speaker };
  });
}

describe("drive-unit batches and makers' lots are register items", () => {
  test("a new batch makes its item and its maker's lot item, links every unit to it from receipt, and its trace reaches speaker and pair", async () => {
    setClock(new Date("2026-11-03T09:00:00Z"));
    const batch = await registerBatch(db(), { partType: "tweeter", partNumber: "TR-1", maker: "Invented maker", lot: "L-TRACE-1", receivedOn: "2026-11-02", makerSerials: ["MS-001", "MS-002", "MS-003"], count: 3 }, lab);
    const batchItem = (await itemByIdentity(db(), batch.code))!;
    const lotItem = (await itemByIdentity(db(), "Invented maker lot L-TRACE-1"))!;
    expect(batchItem).toMatchObject({ kind: "unit_batch", state: "received", id: batch.itemId });
    expect(lotItem).toMatchObject({ kind: "maker_lot", state: "received" });
    // Each unit holds its batch from the moment it was registered, and the batch holds its lot.
    const openLinks = await db().all<{ parent_id: string; started_at: number; position: string }>(
      sql`SELECT parent_id, started_at, position FROM links WHERE child_id = ${batchItem.id} AND ended_at IS NULL`,
    );
    expect(openLinks.map((l) => l.parent_id).sort()).toEqual(batch.units.map((u) => u.id).sort());
    for (const u of batch.units) expect(openLinks.find((l) => l.parent_id === u.id)!.started_at).toBe(u.createdAt.getTime());
    expect(openLinks.every((l) => l.position === "BATCH")).toBe(true);

    setClock(new Date("2026-11-10T09:00:00Z"));
    const { pair, speaker } = await speakerWith("B1", [batch.units[0]!]);
    for (const root of [batchItem, lotItem]) {
      const holders = await traceForward(db(), root.id);
      expect(holders.map((h) => h.identity)).toEqual(expect.arrayContaining([speaker.identity, pair.identity, ...batch.units.map((u) => u.identity)]));
      expect((await affectedByItem(db(), root.id)).filter((a) => a.kind === "pair" || a.kind === "speaker").map((a) => a.identity)).toEqual([pair.identity, speaker.identity]);
    }
    // Backward from the speaker: the unit, then its batch, then the maker's lot.
    const down = await traceBackward(db(), speaker.id);
    expect(down.map((n) => n.kind)).toEqual(expect.arrayContaining(["drive_unit", "unit_batch", "maker_lot"]));
  });

  test("a second batch of the same maker's lot shares the one lot item", async () => {
    setClock(new Date("2026-11-04T09:00:00Z"));
    const second = await registerBatch(db(), { partType: "tweeter", partNumber: "TR-1", maker: "Invented maker", lot: "L-TRACE-1", receivedOn: "2026-11-04", makerSerials: [], count: 1 }, lab);
    const lots = await db().select().from(items).where(eq(items.identity, "Invented maker lot L-TRACE-1"));
    expect(lots).toHaveLength(1);
    const holders = await traceForward(db(), lots[0]!.id);
    expect(holders.map((h) => h.identity)).toEqual(expect.arrayContaining([second.code, second.units[0]!.identity]));
  });

  test("a maker's lot whose name another kind of item already has is refused and nothing is written", async () => {
    await db().transaction((tx) => createItem(tx, { kind: "component_lot", identity: "Clash maker lot L-9", state: "in_stock" }, { actorId: null, station: "lab" }));
    const before = await db().all<{ n: number }>(sql`SELECT (SELECT count(*) FROM items) + (SELECT count(*) FROM unit_batches) AS n`);
    const e = await registerBatch(db(), { partType: "bass", partNumber: "B-1", maker: "Clash maker", lot: "L-9", receivedOn: "2026-11-04", makerSerials: [], count: 2 }, lab).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(AppError);
    expect((e as AppError).message).toMatch(/already the name of a component lot/);
    const after = await db().all<{ n: number }>(sql`SELECT (SELECT count(*) FROM items) + (SELECT count(*) FROM unit_batches) AS n`);
    expect(after[0]!.n).toBe(before[0]!.n);
  });
});

describe("a flitch reaches its leaves, their cabinets, and the cabinets' pair", () => {
  test("forward trace and affected pairs from a flitch", async () => {
    const model = (await db().select().from(models)).find((m) => m.leavesPerFace === 2)!;
    const walnut = (await db().select().from(finishes)).find((f) => f.kind === "veneer")!;
    const flitch = await receiveFlitch(db(), { finishId: walnut.id, logReference: "R", supplier: "S", receivedOn: "2026-11-01", leafThicknessMm: 0.6, leafCount: 4 }, veneer);
    const view = (await flitchView(db(), flitch.identity))!;
    for (const l of view.leaves) await measureLeaf(db(), l.id, { lengthMm: 900, widthMm: 300, usable: true }, veneer);
    const [made] = await confirmRuns(db(), { flitchId: flitch.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, veneer);
    const holders = (await traceForward(db(), flitch.id)).map((h) => h.identity);
    expect(holders).toEqual(expect.arrayContaining([...view.leaves.map((l) => l.identity), made!.left.identity, made!.right.identity, made!.pair.identity]));
    expect((await affectedByItem(db(), flitch.id)).filter((a) => a.kind === "pair" || a.kind === "speaker").map((a) => a.identity)).toEqual([made!.pair.identity]);
    // Run through route and the press step: the readings selection finds this pair.
    const route = await pairRoute(db(), made!.pair);
    const press = route.spec.steps.find((s) => s.station === "press")!;
    const when = new Date("2026-12-07T08:00:00Z");
    setClock(when);
    // The forming press is the route's first step (lib/route/default-spec.ts).
    expect(press.seq).toBe(1);
    const input = Object.fromEntries(Object.entries(goodReadings(press.key)).map(([k, v]) => [k, v === "pass" ? true : v]));
    const checked = checkReadings(press, input);
    await recordStep(db(), { pairId: made!.pair.id, seq: press.seq, sides: ["L", "R"], startedAt: when, readings: input, confirmOutOfWindow: checked.ok ? outOfWindowConfirmation(checked.outOfWindow) : null }, cabinet);

    const hits = await readingsAtStation(db(), { station: "press", from: "2026-12-07", to: "2026-12-07" });
    expect(hits).toHaveLength(1);
    expect(hits[0]).toMatchObject({ station: "press", seq: press.seq, pair: { identity: made!.pair.identity } });
    expect(hits[0]!.cabinets.map((c) => [c.side, c.identity])).toEqual([["L", made!.left.identity], ["R", made!.right.identity]]);
    // Outside the window, or another station: nothing.
    expect(await readingsAtStation(db(), { station: "press", from: "2026-12-08", to: "2026-12-31" })).toEqual([]);
    expect(await readingsAtStation(db(), { station: "oven", from: "2026-12-01", to: "2026-12-31" })).toEqual([]);
    expect(await readingsAtStation(db(), { station: "press", from: "2026-12-07T07:59:00Z", to: "2026-12-07T08:01:00Z" })).toHaveLength(1);
  });
});

describe("readings at a station: refusals", () => {
  test.each([
    [{ station: "kiln", from: "2026-01-01", to: "2026-01-31" }, /"kiln" is not a station of the cabinet route/],
    [{ station: "", from: "2026-01-01", to: "2026-01-31" }, /Name a station of the cabinet route/],
    [{ station: "press", from: "2026-02-01", to: "2026-01-01" }, /The end of the window is before its start/],
    [{ station: "press", from: "yesterday", to: "2026-01-01" }, /The start "yesterday" is not a date/],
    [{ station: "press", from: "2026-01-01", to: "2026-02-30" }, /The end "2026-02-30" is not a date/],
    [{ station: "press", from: "2026-01-01T10:00", to: "2026-01-02" }, /The start "2026-01-01T10:00" is not a date/],
    [{ station: "press", from: undefined, to: "2026-01-02" }, /The start is missing/],
  ])("%o is refused", async (input, message) => {
    const e = await readingsAtStation(db(), input).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(AppError);
    expect((e as AppError).status).toBe(400);
    expect((e as AppError).message).toMatch(message);
  });
});

describe("search finds maker serials and maker lots", () => {
  test("a maker's serial finds its unit, in any case; a maker's lot code finds its lot item", async () => {
    setClock(new Date("2026-11-05T09:00:00Z"));
    const batch = await registerBatch(db(), { partType: "midrange", partNumber: "MR-1", maker: "Search maker", lot: "Lot-Srch-7", receivedOn: "2026-11-05", makerSerials: ["qx-7781", "QX-7782"], count: 2 }, lab);
    const one = await search(db(), "QX-7781");
    expect(one.exact).toMatchObject({ type: "item", identity: batch.units[0]!.identity, kind: "drive_unit" });
    const lot = await search(db(), "lot-srch-7");
    expect(lot.exact).toMatchObject({ type: "item", identity: "Search maker lot Lot-Srch-7", kind: "maker_lot" });
    const none = await search(db(), "QX-0000");
    expect(none.exact).toBeNull();
  });
});
