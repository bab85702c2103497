import { join } from "node:path";
import { and, eq, isNull, sql } from "drizzle-orm";
import { beforeAll, describe, expect, onTestFinished, test } from "vitest";
import { getDb, openDb } from "@/db";
import { migrateDatabase } from "@/db/migrate";
import { events, items, links } from "@/db/schema";
import { seedHistory } from "@/db/seed/history";
import { seedDemo, type SeedResult } from "@/db/seed/seed";
import { traceForward } from "@/lib/genealogy/trace";
import { parseLeafIdentity, parseSerial, SERIAL_KIND_LETTERS, type SerialKind } from "@/lib/serials";

const DAY = 86_400_000;
let first: SeedResult;
let seededAt: Date;

beforeAll(async () => {
  seededAt = new Date();
  first = await seedDemo(getDb());
}, 60_000);

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
    expect(new Set(inWorkshop.map((p) => p.state))).toEqual(new Set(["in_production", "in_assembly", "awaiting_test", "tested", "packed"]));

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
    const failed = await db().select().from(items).where(and(eq(items.kind, "drive_unit"), eq(items.state, "failed")));
    expect(failed).toHaveLength(1);
    expect(failed[0]!.partType).toBe("tweeter");

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
    // The service desk can write to the owner of the repaired pair.
    const [owned] = await db().all<{ n: number }>(sql`
      SELECT count(*) AS n FROM ownerships o
      JOIN links pl ON pl.parent_id = o.item_id
      JOIN links t ON t.parent_id = pl.child_id AND t.position = 'T'
      JOIN items u ON u.id = t.child_id AND u.state = 'failed'`);
    expect(Number(owned!.n)).toBe(1);
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

  test("the same now and seed give the same register; another seed another one", async () => {
    const now = new Date("2026-03-16T12:00:00Z");
    const [a, b, c] = [await freshDb("a"), await freshDb("b"), await freshDb("c")];
    const ca = await seedHistory(a, { now, seed: 7, months: 3 });
    await seedHistory(b, { now, seed: 7, months: 3 });
    await seedHistory(c, { now, seed: 8, months: 3 });
    expect(ca.pairs).toBeGreaterThan(0);
    expect(await snapshot(b)).toEqual(await snapshot(a));
    expect(await snapshot(c)).not.toEqual(await snapshot(a));
    // Serials carry the year the part was registered in.
    const years = new Set((await snapshot(a)).filter((i) => i.kind === "pair").map((i) => parseSerial(i.identity)!.year));
    expect([...years].every((y) => y === 2025 || y === 2026)).toBe(true);
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
