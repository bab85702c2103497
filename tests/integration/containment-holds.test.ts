/**
 * Open containments bite where the work happens: a held pair gets no route step, is not built,
 * packed or shipped; a quarantined drive unit or crossover board is not scanned into a speaker,
 * not offered to the lab's matching or the service desk's replacements, and not reserved. Each
 * refusal is a 409 naming the containment and writes nothing; once quality clears the serials,
 * the same action works again. On the demo register (six months of history) plus fixtures made
 * here the way each area's own tests make them.
 */
import { and, eq, sql } from "drizzle-orm";
import { afterEach, beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { caseFindings, dealers, finishes, items, models, responses, serviceCases, users, type Item } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { buildSpeakers, checkScan, pairsAwaitingAssembly, reservedSets } from "@/lib/assembly";
import { AppError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { now, setClock } from "@/lib/clock";
import { moveAffected, raiseContainment, type Raised } from "@/lib/containments";
import { packPair, readyToPack, shipCartons, waitingToShip } from "@/lib/dispatch";
import { scannedContents } from "../fixtures/packing";
import { isoDay } from "@/lib/dispatch/dates";
import { appendEvent } from "@/lib/events/queries";
import { acceptCrossoverPlan, buildCrossover, matchCrossovers, type BoardPartInput } from "@/lib/lab/crossovers";
import { acceptPlan, importResponseFiles, matchBatch, matchReadiness, registerBatch } from "@/lib/lab/units";
import { pairRoute, recordStep } from "@/lib/route/pair-route";
import { partAt, replacementView, reserveReplacement, speakerOf } from "@/lib/service/replacements";
import { moveCase } from "@/lib/service/states";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { goodReadings } from "../fixtures/route";
import { boardResponse, unitResponse } from "../fixtures/responses";

const db = () => getDb();
const ids = { quality: "", veneer: "", cabinet: "", assembly: "", packing: "", lab: "", service: "" };

beforeAll(async () => {
  await seedDemo(db(), { months: 6 });
  for (const role of Object.keys(ids) as (keyof typeof ids)[]) {
    ids[role] = (await db().select().from(users).where(eq(users.email, `${role}@demo.twinleaf.test`)))[0]!.id;
  }
}, 120_000);
afterEach(() => setClock(null));

const quality = () => ({ id: ids.quality });

/** Every table a refused action could write to, counted. */
const TABLES = ["events", "items", "links", "route_records", "route_starts", "set_members", "matched_sets", "case_reservations", "carton_locations", "shipment_details", "outbox", "certificates"];
async function counts(): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of TABLES) out[t] = Number((await db().all<{ n: number }>(sql.raw(`SELECT count(*) AS n FROM ${t}`)))[0]!.n);
  return out;
}

async function refusal(p: Promise<unknown>): Promise<AppError> {
  const e = await p.then(
    () => null,
    (x: unknown) => x,
  );
  expect(e, "expected a refusal").toBeInstanceOf(AppError);
  return e as AppError;
}

/** Raises a containment on `target` and returns it with its affected serials. */
const raise = (target: string, reason = "Suspect part from the supplier: inspect before use.") => raiseContainment(db(), { target, reason, severity: "major" }, quality());

/** Quality clears every affected serial of the containment: the hold is released. */
const clear = (raised: Raised) => moveAffected(db(), { code: raised.code, serials: raised.affected.map((a) => a.identity), to: "cleared" }, quality());

/** A refusal that names the containment and writes nothing. */
async function refusedNaming(raised: Raised, action: () => Promise<unknown>, status = 409): Promise<AppError> {
  const before = await counts();
  const e = await refusal(action());
  expect(e.status).toBe(status);
  expect(e.message).toContain(raised.code);
  expect(await counts()).toEqual(before);
  return e;
}

// ---- fixtures, as each area's own tests make them -------------------------------------------------

/** A veneered pair from a new flitch, as the veneer room makes it (tests/integration/route.test.ts). */
async function newPair() {
  const model = (await db().select().from(models)).find((m) => m.leavesPerFace === 2)!;
  const veneer = (await db().select().from(finishes)).find((f) => f.kind === "veneer")!;
  const flitch = await receiveFlitch(db(), { finishId: veneer.id, logReference: "R-HOLD", supplier: "S", receivedOn: "2026-11-01", leafThicknessMm: 0.6, leafCount: 4 }, { id: ids.veneer });
  const view = (await flitchView(db(), flitch.identity))!;
  for (const l of view.leaves) await measureLeaf(db(), l.id, { lengthMm: 900, widthMm: 300, usable: true }, { id: ids.veneer });
  const [made] = await confirmRuns(db(), { flitchId: flitch.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, { id: ids.veneer });
  return made!;
}

async function firstStep(pair: Item) {
  const s = (await pairRoute(db(), pair)).spec.steps[0]!;
  return recordStep(db(), { pairId: pair.id, seq: s.seq, sides: ["L", "R"], startedAt: now(), readings: goodReadings(s.key) }, { id: ids.cabinet });
}

const goodParts = (): BoardPartInput[] => [
  { position: "C1", lot: "LOT-HOLD-C47", partNumber: "PP-475-400", nominal: "4.7µF", tolerance: "J", reading: "4.72µF" },
  { position: "L1", lot: "LOT-HOLD-L82", partNumber: "AC-082", nominal: "0.82mH", tolerance: "K", reading: "0.81 mH" },
  { position: "R1", lot: "LOT-HOLD-R82", partNumber: "WW-8R2-10", nominal: "8.2Ω", tolerance: "J", reading: "8R2" },
];

// ---- the places the holds bite ---------------------------------------------------------------------

describe("the cabinet route", () => {
  test("a pair whose cabinet is held gets no step (nor its route started) until quality clears it", async () => {
    const { pair } = await newPair();
    const [left] = await db().all<{ identity: string }>(sql`SELECT c.identity FROM links l JOIN items c ON c.id = l.child_id WHERE l.parent_id = ${pair.id} AND l.position = 'CAB-L' AND l.ended_at IS NULL`);
    const raised = await raise(left!.identity);
    expect(raised.affected.map((a) => [a.identity, a.group])).toContainEqual([pair.identity, "in_build"]);

    const e = await refusedNaming(raised, () => firstStep(pair));
    expect(e.message).toContain(pair.identity);

    await clear(raised);
    const done = await firstStep(pair);
    expect(done.recordId).toBeGreaterThan(0);
    expect((await pairRoute(db(), pair)).started).toBe(true);
  });
});

describe("assembly", () => {
  test("a held pair is not built, and a quarantined drive unit or crossover board is not scanned into it", async () => {
    const [waiting] = await pairsAwaitingAssembly(db());
    expect(waiting?.heldBy).toEqual([]);
    const pair = (await db().select().from(items).where(eq(items.identity, waiting!.identity)))[0]!;
    // One matched set of the pair's model per field: the demo reserves them for its models.
    const groups = await reservedSets(db());
    const setFor = (partType: string) => groups.find((g) => g.partType === partType)!.sets.find((s) => s.model === waiting!.model)!;
    const scans = (["tweeter", "midrange", "bass", "crossover"] as const).flatMap((partType) => {
      const set = setFor(partType);
      const slot = { tweeter: "T", midrange: "M", bass: "B", crossover: "XO" }[partType];
      return [
        { side: "L" as const, slot, code: set.left! },
        { side: "R" as const, slot, code: set.right! },
      ];
    });
    const build = () => buildSpeakers(db(), { pairId: pair.id, scans, inspection: { clean: true, inspected: true, note: "" } }, { id: ids.assembly });

    // A quarantined tweeter, then a quarantined board: each refused at the scan, naming its containment.
    for (const slot of ["T", "XO"]) {
      const scan = scans.find((s) => s.slot === slot && s.side === "L")!;
      const raised = await raise(scan.code);
      expect(raised.affected.map((a) => [a.identity, a.group])).toEqual([[scan.code, "in_stock"]]);
      const checked = await checkScan(db(), { pairId: pair.id, side: "L", slot, code: scan.code, chosen: [] });
      expect(checked.ok).toBe(false);
      expect(!checked.ok && checked.reason).toContain(raised.code);
      const e = await refusedNaming(raised, build);
      expect(e.fieldErrors?.[`L.${slot}`]?.[0]).toContain(raised.code);
      await clear(raised);
      await expect(checkScan(db(), { pairId: pair.id, side: "L", slot, code: scan.code, chosen: [] })).resolves.toMatchObject({ ok: true });
    }

    // The pair itself held: not built, and the station's list marks it.
    const raised = await raise(pair.identity);
    expect((await pairsAwaitingAssembly(db())).find((p) => p.identity === pair.identity)?.heldBy).toEqual([raised.code]);
    await refusedNaming(raised, build);
    await clear(raised);
    const built = await build();
    expect(built.speakers.L.identity).toBeTruthy();
  });
});

describe("packing and shipping", () => {
  test("a held pair is not packed, nor its carton shipped, and the lists mark it; both work once it is cleared", async () => {
    const ready = await readyToPack(db());
    const target = ready.find((p) => p.heldBy === null)!;
    const pair = (await db().select().from(items).where(eq(items.identity, target.identity)))[0]!;
    const contents = await scannedContents(db(), pair.identity, "Rack H");
    const pack = () => packPair(db(), contents, { id: ids.packing });

    const held = await raise(pair.identity);
    expect((await readyToPack(db())).find((p) => p.identity === pair.identity)?.heldBy).toBe(held.code);
    await refusedNaming(held, pack);
    await clear(held);
    expect((await readyToPack(db())).find((p) => p.identity === pair.identity)?.heldBy).toBeNull();
    const packed = await pack();

    // The carton just packed: its pair held again by a second containment, now in the packed group.
    const again = await raise(pair.identity, "A second look at the same pair.");
    expect(again.affected.find((a) => a.identity === pair.identity)?.group).toBe("packed");
    expect((await waitingToShip(db())).find((c) => c.carton === packed.carton.identity)?.heldBy).toBe(again.code);
    const dealer = (await db().select().from(dealers).where(eq(dealers.active, true)))[0]!;
    const ship = () => shipCartons(db(), { dealerId: dealer.id, cartons: [packed.carton.identity], shippedOn: isoDay(now()), carrier: "Invented Freight", tracking: "HOLD1" }, { id: ids.packing });
    const e = await refusedNaming(again, ship);
    expect(e.fieldErrors?.cartons?.[0]).toContain(again.code);
    await clear(again);
    const shipped = await ship();
    expect(shipped.pairs.map((p) => p.pair)).toEqual([pair.identity]);
  });
});

describe("the lab's matching", () => {
  test("a quarantined drive unit is left out of the plan and counted, and a plan naming it is refused", async () => {
    const lab = { id: ids.lab };
    const batch = await registerBatch(db(), { partType: "tweeter", partNumber: "T-HOLD", maker: "Invented maker", lot: "L-HOLD", receivedOn: "2026-11-30", makerSerials: [], count: 4 }, lab);
    await importResponseFiles(db(), batch.units.map((u) => ({ name: `${u.identity}.txt`, text: unitResponse(u.identity, 90) })), { batchId: batch.id, source: "upload" }, lab);
    const which = { id: batch.id, partType: "tweeter" as const };
    const [a, b] = batch.units;
    const raised = await raise(a!.identity);

    const view = await matchBatch(db(), which, { limitDb: 0.5 });
    expect(view.units.map((u) => u.identity)).not.toContain(a!.identity);
    expect(view.units).toHaveLength(3);
    expect(view.quarantined).toEqual([{ itemId: a!.id, identity: a!.identity, code: raised.code }]);
    expect((await matchReadiness(db(), which)).quarantined).toBe(1);
    const model = (await db().select().from(models)).find((m) => m.code === "PW2") ?? (await db().select().from(models))[0]!;
    const accept = () => acceptPlan(db(), { batchId: batch.id, modelId: model.id, pairs: [{ a: a!.identity, b: b!.identity }] }, lab);
    await refusedNaming(raised, accept);

    await clear(raised);
    const back = await matchBatch(db(), which, { limitDb: 0.5 });
    expect(back.units.map((u) => u.identity)).toContain(a!.identity);
    expect(back.quarantined).toEqual([]);
    const [set] = await accept();
    expect(set).toMatchObject({ left: a!.identity, right: b!.identity });
  });

  test("a quarantined crossover board is not offered for pairing, and is again once cleared", async () => {
    const lab = { id: ids.lab };
    const model = (await db().select().from(models)).find((m) => m.code === "PW2") ?? (await db().select().from(models))[0]!;
    const boards: Item[] = [];
    for (let i = 0; i < 2; i++) boards.push((await buildCrossover(db(), { modelId: model.id, parts: goodParts(), response: { name: `xo-hold-${i}.txt`, text: boardResponse() } }, lab)).crossover);
    const raised = await raise(boards[0]!.identity);
    const view = await matchCrossovers(db(), { modelId: model.id, limitDb: 0.5 });
    expect(view.units.map((u) => u.identity)).not.toContain(boards[0]!.identity);
    expect(view.quarantined.map((q) => [q.identity, q.code])).toEqual([[boards[0]!.identity, raised.code]]);
    const accept = () => acceptCrossoverPlan(db(), { modelId: model.id, limitDb: 0.5, pairs: [{ a: boards[0]!.identity, b: boards[1]!.identity }] }, lab);
    await refusedNaming(raised, accept);
    await clear(raised);
    expect((await matchCrossovers(db(), { modelId: model.id, limitDb: 0.5 })).units.map((u) => u.identity)).toContain(boards[0]!.identity);
    await expect(accept()).resolves.toHaveLength(1);
  });
});

describe("the service desk's replacements", () => {
  test("a quarantined stock tweeter is not among the candidates and cannot be reserved until it is cleared", async () => {
    const desk = { id: ids.service };
    const lab = { id: ids.lab };
    // A shipped pair whose right tweeter has a measured response: the survivor (service-replace.test.ts).
    let world: { pair: Item; left: Item; right: Item; points: number[][] } | null = null;
    for (const pair of await db().select().from(items).where(and(eq(items.kind, "pair"), eq(items.state, "shipped")))) {
      const L = await speakerOf(db(), pair.id, "L");
      const R = await speakerOf(db(), pair.id, "R");
      const tR = R ? await partAt(db(), R.id, "T") : null;
      const [resp] = tR ? await db().select().from(responses).where(and(eq(responses.itemId, tR.id), eq(responses.purpose, "unit"))).limit(1) : [];
      if (L && R && resp) {
        world = { pair, left: L, right: R, points: resp.points };
        break;
      }
    }
    expect(world).not.toBeNull();
    const { pair, left, right, points } = world!;
    // A case for the left speaker, diagnosed with a finding at its tweeter.
    const id = newId();
    const code = "RT2601-9501";
    const eventId = await appendEvent(db(), { actorId: desk.id, station: "service", type: "case.opened", subjectKind: "case", subjectId: id, data: { code } });
    await db().insert(serviceCases).values({ id, code, itemId: left.id, pairId: pair.id, partnerId: right.id, returnedBy: "owner", receivedOn: "2026-12-01", symptom: "no treble from the left speaker", openedAt: now(), eventId });
    await moveCase(db(), { caseId: id, to: "diagnosed" }, desk);
    const f = await appendEvent(db(), { actorId: desk.id, station: "service", type: "case.finding_recorded", subjectKind: "case", subjectId: id, data: { code, side: "L", position: "T", finding: "open voice coil" } });
    await db().insert(caseFindings).values({ caseId: id, side: "L", position: "T", finding: "open voice coil", eventId: f, createdAt: now() });
    // Stock tweeters 0.1 dB from the survivor: within every demo model's 0.5 dB tweeter limit (db/seed/data.ts).
    const batch = await registerBatch(db(), { partType: "tweeter", partNumber: "T-SVC-HOLD", maker: "Invented maker", lot: "SVC-HOLD", receivedOn: "2026-11-30", makerSerials: [], count: 2 }, lab);
    const files = batch.units.map((u) => ({ name: `${u.identity}.txt`, text: [`* ${u.identity}`, "Freq(Hz) SPL(dB)", ...points.map(([hz, level]) => `${hz}\t${(level! + 0.1).toFixed(4)}`)].join("\n") }));
    await importResponseFiles(db(), files, { batchId: batch.id, source: "upload" }, lab);
    const unit = batch.units[0]!;
    const place = { code, side: "L", position: "T" };
    expect((await replacementView(db(), place)).candidates.map((c) => c.id)).toContain(unit.identity);

    const raised = await raise(unit.identity);
    const view = await replacementView(db(), place);
    expect(view.candidates.map((c) => c.id)).not.toContain(unit.identity);
    expect(view.stock.has(unit.identity)).toBe(false);
    const reserve = () => reserveReplacement(db(), { ...place, serial: unit.identity }, desk);
    const e = await refusedNaming(raised, reserve);
    expect(e.fieldErrors?.serial?.[0]).toContain(raised.code);

    await clear(raised);
    expect((await replacementView(db(), place)).candidates.map((c) => c.id)).toContain(unit.identity);
    await expect(reserve()).resolves.toMatchObject({ serial: unit.identity, side: "L", position: "T" });
  });
});
