import { join } from "node:path";
import { and, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import { beforeAll, describe, expect, onTestFinished, test } from "vitest";
import { getDb, openDb } from "@/db";
import { migrateDatabase } from "@/db/migrate";
import { certificateRevisions, certificates, events, items, links, modelTolerances, models, outbox, responses, serviceCases, unitBatches } from "@/db/schema";
import { seedHistory } from "@/db/seed/history";
import { seedDemo, type SeedResult } from "@/db/seed/seed";
import { bandLevels, thirdOctaveBands } from "@/lib/acoustics";
import { assemblyView, pairsAwaitingAssembly, reservedSets, unpairedLacquerCabinets } from "@/lib/assembly";
import { pairContext } from "@/lib/assembly/context";
import { certificateData } from "@/lib/certificates";
import { readyToPack, verifyCertificate, waitingToShip } from "@/lib/dispatch";
import { epcisDocumentForItem } from "@/lib/genealogy/epcis";
import { itemDetails } from "@/lib/genealogy/queries";
import { traceBackward, traceForward } from "@/lib/genealogy/trace";
import { crossoverBoards } from "@/lib/lab/crossovers";
import { latestFinalTest, pairsAwaitingTest } from "@/lib/lab/final-test";
import { batchUnitsView, listBatches, matchBatch, openSets, PASSBANDS } from "@/lib/lab/units";
import { pairCost } from "@/lib/matching";
import { currentQuote } from "@/lib/payments/quotes";
import { dispositionedNonconformances, ncsToDisposition } from "@/lib/route/nonconformances";
import { pairRoute } from "@/lib/route/pair-route";
import { shopPairs } from "@/lib/route/shop";
import { warrantyFacts } from "@/lib/service/queries";
import { caseReturnOf } from "@/lib/service/return";
import { parseLeafIdentity, parseSerial, SERIAL_KIND_LETTERS, type SerialKind } from "@/lib/serials";
import { flitchView, listFlitches, planView, specFor } from "@/lib/veneer/flitches";
import type { PartType } from "@/lib/vocabulary/part-types";

const DAY = 86_400_000;
let first: SeedResult;
let seededAt: Date;

beforeAll(async () => {
  seededAt = new Date();
  first = await seedDemo(getDb());
}, 240_000);

const db = () => getDb();

async function openLinks(parentKind: string) {
  return db().all<{ parent: string; position: string; child_kind: string; child_attrs: string; child_state: string }>(sql`
    SELECT l.parent_id AS parent, l.position, c.kind AS child_kind, c.attrs AS child_attrs, c.state AS child_state
    FROM links l JOIN items p ON p.id = l.parent_id JOIN items c ON c.id = l.child_id
    WHERE p.kind = ${parentKind} AND l.ended_at IS NULL`);
}

describe("the seeded production history", () => {
  test("holds pairs, some shipped to dealers and some still in the workshop", async () => {
    const pairs = await db().select().from(items).where(eq(items.kind, "pair"));
    expect(first.created.pairs).toBeGreaterThan(0);
    expect(pairs).toHaveLength(first.created.pairs);

    const shipped = pairs.filter((p) => p.state === "shipped");
    const inWorkshop = pairs.filter((p) => p.state !== "shipped");
    expect(shipped.length).toBeGreaterThan(0);
    // Assembly builds a pair in one go (in production → awaiting its test); a passed test makes it ready to pack.
    expect(new Set(inWorkshop.map((p) => p.state))).toEqual(new Set(["in_production", "awaiting_test", "ready_to_pack", "packed"]));

    // A shipped pair sits in a carton inside a shipment to a dealer; one in the workshop in none.
    const shipments = await db().all<{ pair: string; dealer_id: string | null }>(sql`
      SELECT pl.child_id AS pair, s.dealer_id
      FROM links pl JOIN links cl ON cl.child_id = pl.parent_id AND cl.ended_at IS NULL
      JOIN items s ON s.id = cl.parent_id AND s.kind = 'shipment'
      WHERE pl.position = 'PAIR' AND pl.ended_at IS NULL`);
    const shippedIds = new Set(shipments.map((r) => r.pair));
    expect(shipments.every((r) => r.dealer_id !== null)).toBe(true);
    expect(shipped.every((p) => shippedIds.has(p.id))).toBe(true);
    expect(inWorkshop.some((p) => shippedIds.has(p.id))).toBe(false);
  });

  test("every assembled pair holds two speakers at L and R; one still in production holds its two cabinets", async () => {
    const pairs = await db().select({ id: items.id, state: items.state }).from(items).where(eq(items.kind, "pair"));
    const held = await openLinks("pair");
    expect(pairs.some((p) => p.state === "in_production")).toBe(true);
    for (const pair of pairs) {
      const mine = held.filter((l) => l.parent === pair.id).sort((a, b) => a.position.localeCompare(b.position));
      const inProduction = pair.state === "in_production";
      expect(mine.map((l) => l.position)).toEqual(inProduction ? ["CAB-L", "CAB-R"] : ["L", "R"]);
      for (const l of mine) {
        expect(l.child_kind).toBe(inProduction ? "cabinet" : "speaker");
        expect(`${inProduction ? "CAB-" : ""}${JSON.parse(l.child_attrs).side}`).toBe(l.position);
      }
    }
  });

  test("veneered cabinets are bookmatched: consecutive leaves of one flitch, the right ones turned", async () => {
    const rows = await db().all<{ speaker_side: string; pair: string; position: string; leaf: string; orientation: string | null }>(sql`
      SELECT spk.position AS speaker_side, spk.parent_id AS pair, lf.position, leaf.identity AS leaf,
             json_extract(e.data, '$.orientation') AS orientation
      FROM links spk
      JOIN links cab ON cab.parent_id = spk.child_id AND cab.position = 'CAB' AND cab.ended_at IS NULL
      JOIN links lf ON lf.parent_id = cab.child_id AND lf.ended_at IS NULL
      JOIN items leaf ON leaf.id = lf.child_id AND leaf.kind = 'leaf'
      JOIN events e ON e.id = lf.fit_event_id
      WHERE spk.ended_at IS NULL AND spk.position IN ('L', 'R')`);
    expect(rows.length).toBeGreaterThan(0);
    const byPair = new Map<string, typeof rows>();
    for (const r of rows) byPair.set(r.pair, [...(byPair.get(r.pair) ?? []), r]);
    for (const leaves of byPair.values()) {
      const parsed = leaves.map((r) => ({ ...r, id: parseLeafIdentity(r.leaf)!, face: Number(r.position.slice(1)) }));
      expect(new Set(parsed.map((r) => r.id.flitch.canonical)).size).toBe(1);
      const numbers = parsed.map((r) => r.id.leafNo);
      const lowest = Math.min(...numbers);
      for (const r of parsed) {
        // Left face: leaves 1, 3, 5… of the run at F1, F2, F3…; right face: 2, 4, 6…, turned over.
        expect(r.id.leafNo).toBe(lowest + 2 * (r.face - 1) + (r.speaker_side === "R" ? 1 : 0));
        expect(r.orientation).toBe(r.speaker_side === "R" ? "turned" : "as_cut");
      }
    }
  });

  test("the repaired speaker shows the failed tweeter as an ended link and the stock replacement as the open one", async () => {
    // Units failed on the bench were never fitted; tweeters failed in service: the history's one
    // (its removal note), and those the desk's demo cases replaced (db/seed/history/cases.ts).
    const inService = await db()
      .select()
      .from(items)
      .where(and(eq(items.kind, "drive_unit"), eq(items.state, "failed"), sql`EXISTS (SELECT 1 FROM links l WHERE l.child_id = ${items.id})`));
    expect(inService.every((u) => u.partType === "tweeter")).toBe(true);
    const [deskRepairs] = await db().all<{ n: number }>(sql`SELECT count(*) AS n FROM events WHERE type = 'link.removed' AND station = 'service' AND json_extract(data, '$.replacedBy') IS NOT NULL`);
    const failed = [];
    for (const u of inService) {
      const [l] = await db().select({ reason: events.reason }).from(links).innerJoin(events, eq(events.id, links.removeEventId)).where(eq(links.childId, u.id));
      if (l?.reason === "no output above 3 kHz") failed.push(u);
    }
    expect(failed).toHaveLength(1);
    expect(inService.length - 1).toBe(Number(deskRepairs!.n));

    const [old] = await db().select().from(links).where(eq(links.childId, failed[0]!.id));
    expect(old!.position).toBe("T");
    expect(old!.endedAt).not.toBeNull();
    const [removal] = await db().select().from(events).where(eq(events.id, old!.removeEventId!));
    expect(removal).toMatchObject({ type: "link.removed", station: "service", reason: "no output above 3 kHz" });
    // The tweeter served about a year before it failed.
    expect(old!.endedAt!.getTime() - old!.startedAt.getTime()).toBeGreaterThan(300 * DAY);

    const [now] = await db()
      .select({ link: links, unit: items })
      .from(links)
      .innerJoin(items, eq(items.id, links.childId))
      .where(and(eq(links.parentId, old!.parentId), eq(links.position, "T"), isNull(links.endedAt)));
    expect(now!.unit.id).not.toBe(failed[0]!.id);
    expect(now!.unit).toMatchObject({ kind: "drive_unit", partType: "tweeter", state: "fitted", modelId: failed[0]!.modelId });
    expect(now!.link.startedAt.getTime()).toBeGreaterThanOrEqual(old!.endedAt!.getTime());
    // It came from stock: registered well before the repair, not with the pair.
    expect(now!.unit.createdAt.getTime()).toBeLessThan(old!.endedAt!.getTime() - 7 * DAY);
    expect(now!.unit.createdAt.getTime()).toBeGreaterThan(old!.startedAt.getTime());
  });

  test("every step is back-dated in a plausible order and nothing lies in the future", async () => {
    const [span] = await db().all<{ first: number; last: number }>(sql`
      SELECT min(at) AS first, max(at) AS last FROM events WHERE subject_kind = 'item'`);
    expect(Number(span!.first)).toBeLessThan(seededAt.getTime() - 700 * DAY);
    expect(Number(span!.last)).toBeLessThanOrEqual(Date.now());

    // Nothing is fitted before it or its holder was registered.
    const [early] = await db().all<{ n: number }>(sql`
      SELECT count(*) AS n FROM links l JOIN items p ON p.id = l.parent_id JOIN items c ON c.id = l.child_id
      WHERE l.started_at < p.created_at OR l.started_at < c.created_at`);
    expect(Number(early!.n)).toBe(0);

    // A veneered cabinet reaches assembly only after its leaves were pressed and it cured (two weeks).
    const [rushed] = await db().all<{ n: number; total: number }>(sql`
      SELECT sum(cab.started_at - lf.started_at < 14 * ${DAY}) AS n, count(*) AS total
      FROM links cab JOIN links lf ON lf.parent_id = cab.child_id
      JOIN items leaf ON leaf.id = lf.child_id AND leaf.kind = 'leaf'
      WHERE cab.position = 'CAB'`);
    expect(Number(rushed!.total)).toBeGreaterThan(0);
    expect(Number(rushed!.n)).toBe(0);
  });

  test("owners hold shipped pairs from after the pair was shipped", async () => {
    const rows = await db().all<{ state: string; since: number; shipped: number | null }>(sql`
      SELECT p.state, o.since,
        (SELECT min(cl.started_at) FROM links pl JOIN links cl ON cl.child_id = pl.parent_id
         JOIN items s ON s.id = cl.parent_id AND s.kind = 'shipment' WHERE pl.child_id = p.id) AS shipped
      FROM ownerships o JOIN items p ON p.id = o.item_id`);
    expect(rows.length).toBeGreaterThanOrEqual(10);
    for (const r of rows) {
      expect(r.state).toBe("shipped");
      expect(Number(r.since)).toBeGreaterThan(Number(r.shipped));
    }
    // The service desk can write to the owners of the repaired pairs (the demo's cases register
    // the owners they name).
    const [owned] = await db().all<{ n: number }>(sql`
      SELECT count(*) AS n FROM ownerships o
      JOIN links pl ON pl.parent_id = o.item_id
      JOIN links t ON t.parent_id = pl.child_id AND t.position = 'T'
      JOIN items u ON u.id = t.child_id AND u.state = 'failed'`);
    expect(Number(owned!.n)).toBeGreaterThanOrEqual(1);
  });

  test("a forward trace of the shared tweeter capacitor lot reaches many pairs", async () => {
    const [busiest] = await db().all<{ id: string; n: number }>(sql`
      SELECT l.child_id AS id, count(*) AS n FROM links l JOIN items i ON i.id = l.child_id
      WHERE i.kind = 'component_lot' AND i.part_type = 'capacitor' GROUP BY l.child_id ORDER BY n DESC LIMIT 1`);
    const trace = await traceForward(db(), busiest!.id, { mode: "ever" });
    expect(trace.filter((n) => n.kind === "crossover")).toHaveLength(Number(busiest!.n));
    expect(trace.filter((n) => n.kind === "pair").length).toBeGreaterThanOrEqual(8);
  });

  test("every serial of a serialised kind parses as its kind with a valid check character", async () => {
    const all = await db().select({ kind: items.kind, identity: items.identity }).from(items);
    const serialised = all.filter((i) => i.kind in SERIAL_KIND_LETTERS);
    expect(new Set(serialised.map((i) => i.kind))).toEqual(new Set(Object.keys(SERIAL_KIND_LETTERS)));
    for (const { kind, identity } of serialised) {
      const parsed = parseSerial(identity);
      expect(parsed, identity).not.toBeNull();
      expect(parsed!.valid, identity).toBe(true);
      expect(parsed!.canonical).toBe(identity);
      expect(parsed!.kind).toBe(kind as SerialKind);
    }
    const flitches = new Set(all.filter((i) => i.kind === "flitch").map((i) => i.identity));
    for (const leaf of all.filter((i) => i.kind === "leaf")) {
      const parsed = parseLeafIdentity(leaf.identity);
      expect(parsed?.valid, leaf.identity).toBe(true);
      expect(flitches.has(parsed!.flitch.canonical), leaf.identity).toBe(true);
    }
  });

  test("a second seedDemo adds no pairs and writes nothing", async () => {
    const count = async () => (await db().all<{ n: number }>(sql`SELECT (SELECT count(*) FROM items) + (SELECT count(*) FROM events) AS n`))[0]!.n;
    const before = await count();
    const [pairsBefore] = await db().all<{ n: number }>(sql`SELECT count(*) AS n FROM items WHERE kind = 'pair'`);
    const again = await seedDemo(db());
    expect(again.created.pairs).toBe(0);
    expect(await count()).toBe(before);
    expect(Number(pairsBefore!.n)).toBe(first.created.pairs);
  });
});

describe("seedHistory", () => {
  async function freshDb(name: string) {
    const url = `file:${join(process.env.TWINLEAF_TEST_DIR!, `${name}.db`)}`;
    await migrateDatabase(url);
    const opened = openDb(url);
    onTestFinished(() => opened.client.close());
    await seedDemo(opened.db, { history: false });
    return opened.db;
  }
  const snapshot = async (d: ReturnType<typeof getDb>) =>
    d.all<{ kind: string; identity: string; state: string; at: number }>(sql`
      SELECT kind, identity, state, created_at AS at FROM items ORDER BY identity`);

  test("the same now and seed give the same register; another seed another one", { timeout: 240_000 }, async () => {
    // Two months up to late January: the history crosses a new year.
    const now = new Date("2026-01-21T12:00:00Z");
    const [a, b, c] = [await freshDb("a"), await freshDb("b"), await freshDb("c")];
    const ca = await seedHistory(a, { now, seed: 7, months: 2 });
    await seedHistory(b, { now, seed: 7, months: 2 });
    await seedHistory(c, { now, seed: 8, months: 2 });
    expect(ca.pairs).toBeGreaterThan(0);
    expect(await snapshot(b)).toEqual(await snapshot(a));
    expect(await snapshot(c)).not.toEqual(await snapshot(a));
    // Serials carry the year the part was registered in, which is its creation time's.
    const pairs = (await snapshot(a)).filter((i) => i.kind === "pair");
    expect(new Set(pairs.map((i) => parseSerial(i.identity)!.year))).toEqual(new Set([2025, 2026]));
    for (const p of pairs) expect(parseSerial(p.identity)!.year, p.identity).toBe(new Date(Number(p.at)).getUTCFullYear());
  });
});

describe("the seeded veneer room", () => {
  test("every face leaf is recorded once, with the pair its cabinet belongs to, and each flitch's leaves run 1…N", async () => {
    const faces = await db().all<{ leaf: string; n: number }>(sql`SELECT leaf_id AS leaf, count(*) AS n FROM leaf_allocations WHERE role = 'face' GROUP BY leaf_id HAVING n > 1`);
    expect(faces).toEqual([]);
    const mismatched = await db().all<{ id: number }>(sql`
      SELECT a.id FROM leaf_allocations a
      JOIN links l ON l.child_id = a.leaf_id AND l.parent_id = a.cabinet_id AND l.position = a.position
      JOIN events e ON e.id = l.fit_event_id
      WHERE a.role = 'face' AND json_extract(e.data, '$.orientation') IS NOT a.orientation`);
    expect(mismatched).toEqual([]);
    const gaps = await db().all<{ flitch: string }>(sql`
      SELECT f.item_id AS flitch FROM flitches f
      WHERE (SELECT count(*) FROM veneer_leaves v WHERE v.flitch_id = f.item_id) <> f.leaf_count
         OR (SELECT max(seq) FROM veneer_leaves v WHERE v.flitch_id = f.item_id) <> f.leaf_count`);
    expect(gaps).toEqual([]);
  });
});

/** The newest bench response of a drive unit or board, as band levels over `bands`. */
async function levelsOf(identity: string, bands: ReturnType<typeof thirdOctaveBands>) {
  const [row] = await db()
    .select({ points: responses.points })
    .from(responses)
    .innerJoin(items, eq(items.id, responses.itemId))
    .where(and(eq(items.identity, identity), eq(responses.purpose, "unit")))
    .orderBy(desc(responses.id))
    .limit(1);
  return bandLevels(row!.points.map(([hz, level]) => ({ hz: hz!, db: level! })), bands);
}

describe("the service desk's demo cases", () => {
  test("cases in several states: in warranty waiting for a part, out of warranty waiting for payment with a quote, re-tested with a revised certificate, closed", async () => {
    const cases = await db().select().from(serviceCases).orderBy(serviceCases.openedAt);
    const states = cases.map((c) => c.state);
    for (const s of ["received", "diagnosed", "waiting_part", "waiting_payment", "tested", "closed"]) expect(states, s).toContain(s);
    const waitingPart = cases.find((c) => c.state === "waiting_part")!;
    expect((await warrantyFacts(db(), waitingPart))?.inWarranty).toBe(true);
    const waitingPayment = cases.find((c) => c.state === "waiting_payment")!;
    expect((await warrantyFacts(db(), waitingPayment))?.inWarranty).toBe(false);
    expect(await currentQuote(db(), waitingPayment.id)).not.toBeNull();
    const tested = cases.find((c) => c.state === "tested")!;
    const revisions = await db().select().from(certificateRevisions).where(eq(certificateRevisions.caseId, tested.id));
    expect(revisions.map((r) => r.revision)).toEqual([2]);
    const closed = cases.find((c) => c.state === "closed")!;
    expect(await caseReturnOf(db(), closed.id)).toMatchObject({ to: "dealer" });
    // The demo's owners did not agree to be contacted: no message to them is queued.
    const [mails] = await db().all<{ n: number }>(sql`SELECT count(*) AS n FROM outbox o JOIN events e ON e.id = o.event_id WHERE e.subject_kind = 'case'`);
    expect(Number(mails!.n)).toBe(0);
  });
});

describe("the demo tells the truth", () => {
  test("every shipped pair's certificate prints a match figure at every position and the crossover, recomputed from the stored responses", async () => {
    const shipped = await db().select().from(items).where(and(eq(items.kind, "pair"), eq(items.state, "shipped")));
    expect(shipped.length).toBeGreaterThan(40);
    // The repaired positions: each replacement was chosen against the survivor, in no matched set.
    const repaired = await db().all<{ pair: string; position: string }>(sql`
      SELECT pl.parent_id AS pair, l.position FROM links l JOIN items u ON u.id = l.child_id AND u.state = 'failed'
      JOIN links pl ON pl.child_id = l.parent_id AND pl.ended_at IS NULL WHERE l.ended_at IS NOT NULL`);
    let figures = 0;
    for (const pair of shipped) {
      const data = await certificateData(db(), pair.id, { baseUrl: "http://localhost:3000", copy: false });
      const [model] = await db().select().from(models).where(eq(models.id, pair.modelId!));
      const limits = await db().select().from(modelTolerances).where(eq(modelTolerances.modelId, model!.id));
      expect(data.positions.length, pair.identity).toBeGreaterThanOrEqual(3);
      for (const row of data.positions) {
        if (repaired.some((r) => pair.id === r.pair && row.position === r.position)) {
          expect(row.match, `${pair.identity} ${row.position}`).toBeNull();
          continue;
        }
        expect(row.match, `${pair.identity} ${row.position}`).not.toBeNull();
        // The figure is what the matching code says of the two responses now in the register.
        const crossover = row.part === "crossover";
        const bands = crossover ? thirdOctaveBands(model!.responseMinHz, model!.responseMaxHz) : thirdOctaveBands(PASSBANDS[row.part as PartType].minHz, PASSBANDS[row.part as PartType].maxHz);
        const recomputed = pairCost({ id: "L", levels: await levelsOf(row.left!, bands) }, { id: "R", levels: await levelsOf(row.right!, bands) });
        expect(row.match!.maxDiffDb, `${pair.identity} ${row.position}`).toBeCloseTo(recomputed.maxDiffDb, 9);
        expect(row.match!.maxDiffDb).toBeLessThanOrEqual(row.match!.limitDb + 1e-9);
        if (crossover) expect(row.match!.limitDb).toBeLessThanOrEqual(model!.pairResponseLimitDb);
        else expect(row.match!.limitDb).toBe(limits.find((t) => t.partType === row.part)!.mismatchLimitDb);
        figures++;
      }
      expect(data.finalTest?.pass, pair.identity).toBe(true);
      expect(data.signatures.every((s) => s.name !== null), pair.identity).toBe(true);
    }
    expect(figures).toBeGreaterThan(3 * shipped.length);
  });

  test("the register's own read functions take every seeded pair, flitch and batch without complaint", async () => {
    const pairs = await db().select().from(items).where(eq(items.kind, "pair"));
    for (const pair of pairs) {
      const cabinetsHeld = await db().select().from(links).where(and(eq(links.parentId, pair.id), isNull(links.endedAt), inArray(links.position, ["CAB-L", "CAB-R"])));
      if (cabinetsHeld.length) {
        const route = await pairRoute(db(), pair);
        expect(route.cabinets).toHaveLength(2);
        expect(await pairContext(db(), pair)).toMatchObject({ pair: { id: pair.id } });
      }
      expect((await traceBackward(db(), pair.id)).length, pair.identity).toBeGreaterThan(2);
      expect(await itemDetails(db(), pair.identity)).not.toBeNull();
      expect((await epcisDocumentForItem(db(), pair.id, { baseUri: "http://localhost:3000/" })).epcisBody.eventList.length).toBeGreaterThan(0);
      if (["awaiting_test", "ready_to_pack", "packed", "shipped"].includes(pair.state)) expect(await assemblyView(db(), pair.identity)).not.toBeNull();
      if (["ready_to_pack", "packed", "shipped"].includes(pair.state)) expect((await latestFinalTest(db(), pair.id))?.test.pass, pair.identity).toBe(true);
      const [certificate] = await db().select().from(certificates).where(eq(certificates.pairId, pair.id));
      expect(Boolean(certificate), pair.identity).toBe(["packed", "shipped"].includes(pair.state));
      if (certificate) expect((await verifyCertificate(db(), certificate.code))?.pairSerial).toBe(pair.identity);
    }
    for (const f of await listFlitches(db())) {
      const view = (await flitchView(db(), f.identity))!;
      expect(view.leaves).toHaveLength(f.leafCount);
    }
    for (const b of await listBatches(db())) expect((await batchUnitsView(db(), b.id)).length).toBe(Number(b.units));
    expect((await shopPairs(db())).length).toBeGreaterThan(3);
    expect((await crossoverBoards(db(), { limit: 500 })).length).toBeGreaterThan(100);
    expect(await openSets(db())).not.toHaveLength(0);
    expect(await reservedSets(db())).not.toHaveLength(0);
    expect((await pairsAwaitingAssembly(db())).length).toBeGreaterThan(0);
    // The schema's own guards: every reference points somewhere, and the file is sound.
    expect(await db().all(sql`PRAGMA foreign_key_check`)).toEqual([]);
    expect(await db().all(sql`PRAGMA integrity_check`)).toEqual([{ integrity_check: "ok" }]);
  });

  test("two years of shipments queued no e-mail to the dealers", async () => {
    expect(await db().select().from(outbox)).toEqual([]);
    const [dispatched] = await db().all<{ n: number; silent: number }>(sql`
      SELECT count(*) AS n, sum(json_extract(data, '$.dealerMail') = 0) AS silent FROM events WHERE type = 'shipment.dispatched'`);
    expect(Number(dispatched!.n)).toBeGreaterThan(20);
    expect(Number(dispatched!.silent)).toBe(Number(dispatched!.n));
  });
});

describe("the demo when it opens", () => {
  test("a fresh flitch is measured, with a split leaf and a knot, and waits to be planned", async () => {
    const flitches = await listFlitches(db());
    const fresh = flitches.find((f) => f.pairs === 0 && f.measured === f.leafCount)!;
    expect(fresh).toBeDefined();
    const view = (await flitchView(db(), fresh.identity))!;
    expect(view.leaves.flatMap((l) => l.defects.map((d) => `${l.seq}:${d.kind}:${l.usable}`))).toEqual(["9:split:false", "16:knot:true"]);
    const [model] = await db().select().from(models).where(eq(models.code, "PW2"));
    expect(planView(view, specFor(model!, 0)).plan.pairs).toBeGreaterThan(3);
  });

  test("the cabinet shop has pairs at several stations, one held by an open trim nonconformance", async () => {
    const open = await ncsToDisposition(db());
    expect(open).toHaveLength(1);
    expect(open[0]!.nc.finding).toMatch(/^Trim deviation 0.24 mm/);
    // Three decided in the history: a long polishing cycle accepted as it was, a failed final test
    // reworked, and coat 3's mistyped film reading (step 8) corrected and closed as an entry error.
    expect((await dispositionedNonconformances(db())).map((n) => [n.seq, n.disposition]).sort()).toEqual([[0, "rework"], [15, "use_as_is"], [8, "entry_error"]].sort());
    const stations = new Set((await shopPairs(db())).map((p) => p.next?.station).filter(Boolean));
    expect(stations.size).toBeGreaterThanOrEqual(3);
    expect((await unpairedLacquerCabinets(db())).flatMap((g) => g.cabinets).length).toBeGreaterThanOrEqual(2);
  });

  test("the lab has tweeters measured and ready to match, and bass units waiting for the bench", async () => {
    const batches = await listBatches(db());
    const [tweeters] = batches.filter((b) => b.partType === "tweeter");
    const [bass] = batches.filter((b) => b.partType === "bass");
    expect(tweeters).toMatchObject({ units: 12, free: 12, reserved: 0 });
    expect(bass).toMatchObject({ units: 8, waiting: 8 });
    const [batch] = await db().select().from(unitBatches).where(eq(unitBatches.id, tweeters!.id));
    expect((await matchBatch(db(), { id: batch!.id, partType: "tweeter" }, { limitDb: 0.5 })).plan.pairs.length).toBeGreaterThan(3);
    // Units no partner suited stay in stock, measured, in the older batches.
    const [left] = await db().all<{ n: number }>(sql`
      SELECT count(*) AS n FROM items i JOIN batch_units bu ON bu.item_id = i.id
      WHERE i.state = 'measured' AND bu.batch_id <> ${tweeters!.id}`);
    expect(Number(left!.n)).toBeGreaterThan(10);
  });

  test("pairs wait at every late station: to be built, to be tested, to be packed, to be shipped", async () => {
    expect((await pairsAwaitingTest(db())).length).toBeGreaterThan(0);
    expect((await readyToPack(db())).length).toBeGreaterThanOrEqual(2);
    expect((await waitingToShip(db())).length).toBeGreaterThan(0);
    const ready = (await pairsAwaitingAssembly(db())).filter((p) => p.openNcs.length === 0);
    expect(ready.length).toBeGreaterThan(0);
  });
});
