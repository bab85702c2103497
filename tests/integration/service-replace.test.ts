/**
 * Replacement parts for a service case, on the invented demo workshop: the ranking against the
 * survivor in the partner speaker, every refusal of a reservation (each writing nothing), the
 * schema's reservations both ways with the lab's matched sets, the release, the repair as link
 * events (trace as built and now), and the move to "repaired".
 *
 * Cases are opened here by hand (the intake is another part's work); stock tweeters are registered
 * and measured with the lab's own functions, their responses the survivor's own shifted by an
 * invented number of dB, so the largest band difference from the survivor is that shift.
 */
import { and, eq, isNull, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { caseFindings, caseReservations, events, items, links, models, responses, serviceCases, setMembers, users, type Item } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { newId } from "@/lib/auth/tokens";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { traceBackward } from "@/lib/genealogy/trace";
import { acceptPlan, batchUnitsView, freeUnitRows, importResponseFiles, listBatches, matchBatch, registerBatch } from "@/lib/lab/units";
import { caseDetailJson } from "@/lib/service/json";
import { fitReplacement, markRepaired, repairsOfCase } from "@/lib/service/repair";
import { partAt, releaseAllOfCase, releaseReservation, replacementView, reservationsOfCase, reserveReplacement, reserveReplacementSet, speakerOf } from "@/lib/service/replacements";
import { moveCase } from "@/lib/service/states";
import { startSession } from "@/lib/auth/sessions";
import { request } from "../setup/next-request";
import { failureText } from "./helpers";

const { GET: getReplacements } = await import("@/app/api/v1/service/cases/[code]/replacements/route");
const { reserveAction } = await import("@/app/(workshop)/service/cases/[code]/replace/actions");

async function signInAs(email: string) {
  const [u] = await db().select().from(users).where(eq(users.email, email));
  request.sessionId = (await startSession(u!.id, db())).session.id;
}

const callReplacements = (code: string, query: string) =>
  getReplacements(new Request(`http://localhost:3000/api/v1/service/cases/${encodeURIComponent(code)}/replacements?${query}`), { params: Promise.resolve({ code }) });

const db = () => getDb();
let desk: { id: string };
let lab: { id: string };

interface World {
  pair: Item;
  speakers: { L: Item; R: Item };
  tweeters: { L: Item; R: Item };
  survivorPoints: number[][];
}

async function shippedPairs(): Promise<World[]> {
  const pairs = await db().select().from(items).where(eq(items.kind, "pair"));
  const out: World[] = [];
  for (const pair of pairs) {
    const L = await speakerOf(db(), pair.id, "L");
    const R = await speakerOf(db(), pair.id, "R");
    if (!L || !R) continue;
    const tL = await partAt(db(), L.id, "T");
    const tR = await partAt(db(), R.id, "T");
    if (!tL || !tR) continue;
    const [resp] = await db().select().from(responses).where(and(eq(responses.itemId, tR.id), eq(responses.purpose, "unit"))).limit(1);
    if (!resp) continue;
    out.push({ pair, speakers: { L, R }, tweeters: { L: tL, R: tR }, survivorPoints: resp.points });
    if (out.length === 2) break;
  }
  return out;
}

/** Opens a case for the left speaker of a pair (or the whole pair), diagnosed with a finding at the left tweeter. */
let opened = 0;
async function openCase(w: World, opts: { whole?: boolean; diagnose?: boolean } = {}) {
  // One open case per pair: the one before is cancelled, its parts released.
  for (const o of await db().select().from(serviceCases).where(eq(serviceCases.pairId, w.pair.id))) {
    if (o.state === "closed" || o.state === "cancelled") continue;
    await releaseAllOfCase(db(), o.id, desk);
    await moveCase(db(), { caseId: o.id, to: "cancelled" }, desk);
  }
  const id = newId();
  // A code of the desk's own shape, from a month no demo case uses.
  const code = `RT2601-${String(9000 + ++opened)}`;
  const eventId = await appendEvent(db(), { actorId: desk.id, station: "service", type: "case.opened", subjectKind: "case", subjectId: id, data: { code } });
  await db().insert(serviceCases).values({ id, code, itemId: opts.whole ? w.pair.id : w.speakers.L.id, pairId: w.pair.id, partnerId: opts.whole ? null : w.speakers.R.id, returnedBy: "owner", receivedOn: "2026-12-01", symptom: "no treble from the left speaker", openedAt: now(), eventId });
  if (opts.diagnose !== false) {
    await moveCase(db(), { caseId: id, to: "diagnosed" }, desk);
    const f = await appendEvent(db(), { actorId: desk.id, station: "service", type: "case.finding_recorded", subjectKind: "case", subjectId: id, data: { code, side: "L", position: "T", finding: "open voice coil" } });
    await db().insert(caseFindings).values({ caseId: id, side: "L", position: "T", finding: "open voice coil", eventId: f, createdAt: now() });
  }
  return { id, code };
}

/** Registers stock tweeters measured as the survivor shifted by each offset (dB). */
async function stockTweeters(w: World, offsets: number[]) {
  const batch = await registerBatch(db(), { partType: "tweeter", partNumber: "T-SVC", maker: "Invented maker", lot: "SVC1", receivedOn: "2026-11-30", makerSerials: [], count: offsets.length }, lab);
  const files = batch.units.map((u, i) => ({
    name: `${u.identity}.txt`,
    text: [`* ${u.identity}`, "Freq(Hz) SPL(dB)", ...w.survivorPoints.map(([hz, level]) => `${hz}\t${(level! + offsets[i]!).toFixed(4)}`)].join("\n"),
  }));
  await importResponseFiles(db(), files, { batchId: batch.id, source: "upload" }, lab);
  return { batch, units: batch.units };
}

const count = async (table: typeof caseReservations | typeof events | typeof links) => Number((await db().select({ n: sql<number>`count(*)` }).from(table))[0]!.n);
const stateOf = async (id: string) => (await db().select({ s: items.state }).from(items).where(eq(items.id, id)))[0]!.s;

let worlds: World[];
let stock: Awaited<ReturnType<typeof stockTweeters>>;

beforeAll(async () => {
  await seedDemo(db(), { months: 6 });
  desk = { id: (await db().select().from(users).where(eq(users.email, "service@demo.twinleaf.test")))[0]!.id };
  lab = { id: (await db().select().from(users).where(eq(users.email, "lab@demo.twinleaf.test")))[0]!.id };
  worlds = await shippedPairs();
  expect(worlds.length).toBe(2);
  // 0.1 dB and 0.2 dB from the survivor fit the demo models' 0.5 dB tweeter limit; 0.8 dB does not;
  // 3.0 and 3.1 dB fit nothing but each other (0.1 dB apart).
  stock = await stockTweeters(worlds[0]!, [0.1, 0.2, 0.8, 3.0, 3.1, 0.15, 0.12]);
}, 120_000);

describe("the ranking against the survivor", () => {
  test("the survivor is the partner's tweeter; candidates are in-stock tweeters within the limit, best first", async () => {
    const c = await openCase(worlds[0]!);
    const view = await replacementView(db(), { code: c.code, side: "L", position: "T" });
    expect(view.survivor.identity).toBe(worlds[0]!.tweeters.R.identity);
    expect(view.current?.identity).toBe(worlds[0]!.tweeters.L.identity);
    const mine = view.candidates.filter((x) => stock.units.some((u) => u.identity === x.id)).map((x) => x.id);
    const [u01, u02, u08, u30, u31, u015, u012] = stock.units.map((u) => u.identity);
    // Shifted by a constant, the RMS difference is the shift itself (PRODUCT.md §3): 0.1 < 0.12 < 0.15 < 0.2.
    expect(mine).toEqual([u01, u012, u015, u02]);
    expect(view.candidates.map((x) => x.id)).not.toContain(u08);
    expect(view.candidates.map((x) => x.id)).not.toContain(u30);
    for (const x of view.candidates) expect(x.maxDiffDb).toBeLessThanOrEqual(view.limitDb + 1e-9);
    for (let i = 1; i < view.candidates.length; i++) expect(view.candidates[i]!.cost).toBeGreaterThanOrEqual(view.candidates[i - 1]!.cost);
    expect(view.limitDb).toBe(0.5); // db/seed/data.ts: every demo model's tweeter limit
    expect(view.sets).toEqual([]);
    void u31;
  });

  test("crossovers: the survivor is the partner's board, ranked against the model's free boards on its response range", async () => {
    const c = await openCase(worlds[0]!);
    const view = await replacementView(db(), { code: c.code, side: "L", position: "XO" });
    const partnerBoard = await partAt(db(), worlds[0]!.speakers.R.id, "XO");
    expect(view.survivor.identity).toBe(partnerBoard!.identity);
    expect(view.partType).toBeNull();
    // lib/lab/crossovers crossoverModels: the tightest drive-unit limit, never looser than the pair's (0.5 dB for the demo models).
    expect(view.limitDb).toBe(0.5);
    for (const x of view.candidates) expect(x.maxDiffDb).toBeLessThanOrEqual(view.limitDb + 1e-9);
    for (const id of view.stock.keys()) expect(id).toMatch(/^X-/);
    expect(view.candidates.length + view.sets.length + (view.why ? 1 : 0)).toBeGreaterThan(0);
  });

  test.each<[string, Record<string, string>, RegExp]>([
    ["an unknown case", { code: "RT-NOPE", side: "L", position: "T" }, /no service case RT-NOPE/],
    ["a side that is neither L nor R", { side: "X", position: "T" }, /Choose the side/],
    ["a position the model does not have", { side: "L", position: "Q9" }, /has no position/],
  ])("refuses %s with words", async (_name, input, message) => {
    const c = await openCase(worlds[0]!, { diagnose: false });
    const err = await failureText(() => replacementView(db(), { code: c.code, side: "L", position: "T", ...input }));
    expect(err).toMatch(message);
  });
});

describe("reserving a part", () => {
  test("every refusal says why, next to the serial, and writes nothing", async () => {
    const c = await openCase(worlds[0]!);
    const [, , u08] = stock.units;
    const before = { r: await count(caseReservations), e: await count(events) };
    const cases: [string, Partial<{ side: string; serial: string }>, RegExp][] = [
      ["unknown serial", { serial: "D-TW-26-99999-0" }, /not a valid serial|no drive unit/],
      ["out of tolerance", { serial: u08!.identity }, /over the 0\.5 dB limit/],
      ["fitted, not in stock", { serial: worlds[1]!.tweeters.L.identity }, /not in stock: it is fitted/],
      ["the other speaker of a one-speaker case", { side: "R", serial: stock.units[0]!.identity }, /reserved only as a matched pair/],
      ["empty", { serial: "  " }, /Type or scan/],
    ];
    for (const [name, input, message] of cases) {
      const err = await failureText(() => reserveReplacement(db(), { code: c.code, side: "L", position: "T", serial: "", ...input }, desk));
      expect(err, name).toMatch(message);
    }
    expect({ r: await count(caseReservations), e: await count(events) }).toEqual(before);
  });

  test("a case not yet diagnosed, or a place with no finding, takes no part", async () => {
    const fresh = await openCase(worlds[1]!, { diagnose: false });
    expect(await failureText(() => reserveReplacement(db(), { code: fresh.code, side: "L", position: "T", serial: stock.units[0]!.identity }, desk))).toMatch(/parts are reserved once it is diagnosed/);
    await moveCase(db(), { caseId: (await db().select().from(serviceCases).where(eq(serviceCases.code, fresh.code)))[0]!.id, to: "cancelled" }, desk);
    const c = await openCase(worlds[0]!);
    expect(await failureText(() => reserveReplacement(db(), { code: c.code, side: "L", position: "B", serial: stock.units[0]!.identity }, desk))).toMatch(/Record a finding/);
  });

  test("a reserved unit is held by the case alone: not free for the lab, not for another case, not for a set; released, it is free again", async () => {
    const c = await openCase(worlds[0]!);
    const u = stock.units[1]!; // 0.2 dB
    const r = await reserveReplacement(db(), { code: c.code, side: "L", position: "T", serial: u.identity.toLowerCase() }, desk);
    expect(r).toMatchObject({ serial: u.identity, side: "L", position: "T" });
    expect(await stateOf(u.id)).toBe("reserved");
    expect((await freeUnitRows(db(), "tweeter")).map((x) => x.identity)).not.toContain(u.identity);
    const view = await matchBatch(db(), { id: stock.batch.id, partType: "tweeter" }, { limitDb: 0.5 });
    expect(view.units.map((x) => x.identity)).not.toContain(u.identity);
    expect((await batchUnitsView(db(), stock.batch.id)).find((x) => x.id === u.id)?.caseCode).toBe(c.code);
    expect((await listBatches(db())).find((b) => b.id === stock.batch.id)?.reserved).toBeGreaterThanOrEqual(1);

    // A second reservation of the same place is refused until the first is released.
    expect(await failureText(() => reserveReplacement(db(), { code: c.code, side: "L", position: "T", serial: stock.units[0]!.identity }, desk))).toMatch(/release it first/);
    // Another case (another pair) is told where it is.
    const other = await openCase(worlds[1]!);
    expect(await failureText(() => reserveReplacement(db(), { code: other.code, side: "L", position: "T", serial: u.identity }, desk))).toMatch(new RegExp(`reserved for service case ${c.code}`));

    // The schema holds it too, whatever the code does: a second open reservation, and a lab set.
    const caseRow = (await db().select().from(serviceCases).where(eq(serviceCases.code, other.code)))[0]!;
    const ev = await appendEvent(db(), { actorId: desk.id, station: "service", type: "case.part_reserved", subjectKind: "case", subjectId: caseRow.id, data: {} });
    expect(await failureText(() => db().insert(caseReservations).values({ caseId: caseRow.id, itemId: u.id, side: "L", position: "T", eventId: ev, createdAt: now() }))).toMatch(/UNIQUE constraint failed: case_reservations\.item_id/);
    const [someSet] = await db().select().from(setMembers).limit(1);
    expect(await failureText(() => db().insert(setMembers).values({ setId: someSet!.setId, itemId: u.id, side: "L" }))).toMatch(/reserved for a service case|UNIQUE constraint failed/);
    // A reservation is history: never deleted, ended once.
    expect(await failureText(() => db().delete(caseReservations).where(eq(caseReservations.itemId, u.id)))).toMatch(/never|history/);

    await releaseReservation(db(), { code: c.code, serial: u.identity }, desk);
    expect(await stateOf(u.id)).toBe("measured");
    expect((await freeUnitRows(db(), "tweeter")).map((x) => x.identity)).toContain(u.identity);
    expect(await failureText(() => releaseReservation(db(), { code: c.code, serial: u.identity }, desk))).toMatch(/not reserved for case/);
    const ended = (await db().select().from(caseReservations).where(eq(caseReservations.itemId, u.id)))[0]!;
    expect(ended.endReason).toBe("released");
    expect(await failureText(() => db().update(caseReservations).set({ endReason: "fitted" }).where(eq(caseReservations.id, ended.id)))).toMatch(/only an open reservation may be ended, once/);
  });

  test("a unit held by a lab matched set cannot be reserved by a case (code and schema)", async () => {
    const pw2 = (await db().select().from(models).where(eq(models.code, "PW2")))[0]!;
    const [a, b] = [stock.units[5]!, stock.units[6]!]; // 0.15 and 0.12 dB: 0.03 dB apart
    await acceptPlan(db(), { batchId: stock.batch.id, modelId: pw2.id, pairs: [{ a: a.identity, b: b.identity }] }, lab);
    const c = await openCase(worlds[0]!);
    expect(await failureText(() => reserveReplacement(db(), { code: c.code, side: "L", position: "T", serial: a.identity }, desk))).toMatch(/reserved in the lab's matched set M-/);
    const caseRow = (await db().select().from(serviceCases).where(eq(serviceCases.code, c.code)))[0]!;
    const ev = await appendEvent(db(), { actorId: desk.id, station: "service", type: "case.part_reserved", subjectKind: "case", subjectId: caseRow.id, data: {} });
    expect(await failureText(() => db().insert(caseReservations).values({ caseId: caseRow.id, itemId: a.id, side: "L", position: "T", eventId: ev, createdAt: now() }))).toMatch(/reserved in a matched set/);
  });
});

describe("the repair", () => {
  test("the failed tweeter comes out with its disposition, the reserved one goes in; as built still shows the original; then the case is repaired", async () => {
    const w = worlds[0]!;
    const c = await openCase(w);
    const caseRow = (await db().select().from(serviceCases).where(eq(serviceCases.code, c.code)))[0]!;
    expect(await failureText(() => markRepaired(db(), { code: c.code }, desk))).toMatch(/Not every finding has its repair/);
    expect(await failureText(() => fitReplacement(db(), { code: c.code, side: "L", position: "T", disposition: "failed", reason: "open voice coil" }, desk))).toMatch(/reserve one first/);
    const u = stock.units[0]!;
    await reserveReplacement(db(), { code: c.code, side: "L", position: "T", serial: u.identity }, desk);
    expect((await caseDetailJson(db(), caseRow)).reserved).toEqual([expect.objectContaining({ side: "L", position: "T", serial: u.identity })]);
    const before = { links: await count(links), events: await count(events) };
    expect(await failureText(() => fitReplacement(db(), { code: c.code, side: "L", position: "T", disposition: "thrown away", reason: "" }, desk))).toMatch(/Choose what becomes/);
    expect({ links: await count(links), events: await count(events) }).toEqual(before);

    const partnerLinks = await db().select().from(links).where(and(eq(links.parentId, w.speakers.R.id), isNull(links.endedAt)));
    const beforeRepair = new Date(now().getTime() - 1);
    const done = await fitReplacement(db(), { code: c.code, side: "L", position: "T", disposition: "returned_to_maker", reason: "open voice coil" }, desk);
    expect(done).toMatchObject({ removed: w.tweeters.L.identity, fitted: u.identity, disposition: "returned_to_maker" });
    expect(await stateOf(w.tweeters.L.id)).toBe("returned_to_maker");
    expect(await stateOf(u.id)).toBe("fitted");
    expect((await partAt(db(), w.speakers.L.id, "T"))?.identity).toBe(u.identity);
    // The partner speaker is not touched.
    expect(await db().select().from(links).where(and(eq(links.parentId, w.speakers.R.id), isNull(links.endedAt)))).toEqual(partnerLinks);
    // Trace: as built (before the repair) shows the original, now shows the replacement.
    const tAt = (nodes: Awaited<ReturnType<typeof traceBackward>>) => nodes.find((n) => n.via === w.speakers.L.id && n.position === "T")?.identity;
    expect(tAt(await traceBackward(db(), w.pair.id, { mode: "at", at: beforeRepair }))).toBe(w.tweeters.L.identity);
    expect(tAt(await traceBackward(db(), w.pair.id))).toBe(u.identity);
    const [res] = await reservationsOfCase(db(), caseRow.id);
    expect(res).toMatchObject({ serial: u.identity, endReason: "fitted" });
    expect(await repairsOfCase(db(), caseRow.id)).toEqual([expect.objectContaining({ side: "L", position: "T", removed: w.tweeters.L.identity, fitted: u.identity, disposition: "returned_to_maker", reason: "open voice coil" })]);
    // The JSON case answers the same, by serials: nothing held any more, one repair.
    const detail = await caseDetailJson(db(), caseRow);
    expect(detail.reserved).toEqual([]);
    expect(detail.repairs).toEqual([expect.objectContaining({ side: "L", position: "T", removed: w.tweeters.L.identity, fitted: u.identity, disposition: "returned_to_maker" })]);

    const moved = await markRepaired(db(), { code: c.code }, desk);
    expect(moved.state).toBe("repaired");
  });

  test("when no single unit fits, both tweeters are replaced with a matched pair from stock, both speakers touched", async () => {
    const w = worlds[1]!;
    // A fresh case on the second pair, whole pair returned.
    const c = await openCase(w, { whole: true });
    const [a, b] = [stock.units[3]!, stock.units[4]!]; // 3.0 and 3.1 dB off the first survivor, 0.1 dB apart
    expect(await failureText(() => reserveReplacementSet(db(), { code: c.code, position: "T", left: a.identity, right: stock.units[0]!.identity.replace(/.$/, "") }, desk))).toMatch(/Nothing was reserved/);
    const r = await reserveReplacementSet(db(), { code: c.code, position: "T", left: a.identity, right: b.identity }, desk);
    expect(r).toMatchObject({ left: a.identity, right: b.identity });
    for (const side of ["L", "R"] as const) {
      await fitReplacement(db(), { code: c.code, side, position: "T", disposition: "scrapped", reason: "replaced as a pair" }, desk);
    }
    expect((await partAt(db(), w.speakers.L.id, "T"))?.identity).toBe(a.identity);
    expect((await partAt(db(), w.speakers.R.id, "T"))?.identity).toBe(b.identity);
    expect(await stateOf(w.tweeters.R.id)).toBe("scrapped");
  });
});

describe("the replacements JSON route", () => {
  test("answers the survivor, the limit, the candidates best first and no sets when one fits", async () => {
    const c = await openCase(worlds[0]!);
    await signInAs("veneer@demo.twinleaf.test"); // register.read is every role's
    const res = await callReplacements(c.code, "side=L&position=T");
    expect(res.status).toBe(200);
    const body = (await res.json()) as { survivor: { serial: string; partType: string }; limitDb: number; candidates: { serial: string; cost: number; maxDiffDb: number }[]; sets: unknown[] };
    expect(body.survivor).toEqual({ serial: (await partAt(db(), worlds[0]!.speakers.R.id, "T"))!.identity, partType: "tweeter" });
    expect(body.limitDb).toBe(0.5);
    expect(body.candidates.length).toBeGreaterThan(0);
    for (const x of body.candidates) expect(Object.keys(x).sort()).toEqual(["cost", "maxDiffDb", "serial"]);
    expect(body.candidates.map((x) => x.cost)).toEqual([...body.candidates.map((x) => x.cost)].sort((a, b) => a - b));
    expect(body.sets).toEqual([]);
  });

  test.each<[string, string, number, RegExp]>([
    ["a side that is not L or R", "side=Q&position=T", 400, /Choose the side/],
    ["no side", "position=T", 400, /not valid/],
    ["a position the model has not", "side=L&position=Z", 400, /has no position/],
  ])("refuses %s with JSON words", async (_name, query, status, words) => {
    const c = await openCase(worlds[0]!);
    await signInAs("service@demo.twinleaf.test");
    const res = await callReplacements(c.code, query);
    expect(res.status).toBe(status);
    const body = (await res.json()) as { error: string };
    expect(body.error).toMatch(words);
  });

  test("an unknown case is 404 in JSON; signed out is 401", async () => {
    await signInAs("service@demo.twinleaf.test");
    const res = await callReplacements("RT-NONE", "side=L&position=T");
    expect(res.status).toBe(404);
    expect(((await res.json()) as { error: string }).error).toMatch(/no service case RT-NONE/);
    request.sessionId = null;
    expect((await callReplacements("RT-NONE", "side=L&position=T")).status).toBe(401);
  });
});

describe("the reserve action", () => {
  test("a serial out of tolerance typed by hand is refused next to the field, and nothing is written", async () => {
    const c = await openCase(worlds[0]!);
    await signInAs("service@demo.twinleaf.test");
    const before = await count(caseReservations);
    const form = new FormData();
    for (const [k, v] of Object.entries({ code: c.code, side: "L", position: "T", serial: stock.units[2]!.identity, fsWeight: "", qtsWeight: "" })) form.set(k, v);
    const state = await reserveAction(undefined, form);
    expect(state.ok).toBe(false);
    expect(state.status).toBe(400);
    expect(state.fieldErrors?.serial?.[0]).toMatch(/over the 0\.5 dB limit/);
    expect(await count(caseReservations)).toBe(before);
  });
});
