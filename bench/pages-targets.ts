/**
 * What the pages benchmark opens, read from the register itself so that a kept database (--db)
 * is timed on the same targets as a fresh one: synthetic pairs and their parts, the lot held by
 * the most serials, the demo's cabinet pair with the most route records and its service case
 * with the most findings, and the demo user of each role.
 */
import { sql } from "drizzle-orm";
import type { Db } from "@/db";

export interface Targets {
  items: number;
  pairs: string[];
  speakers: string[];
  driveUnits: string[];
  bulkLot: { identity: string; serials: number };
  cabinetPair: string;
  serviceCase: string;
  users: Record<string, string>;
}

const SAMPLE = 10;
const MIN_LOT_SERIALS = 5000;

export async function pickTargets(db: Db): Promise<Targets> {
  const [count] = await db.all<{ n: number }>(sql`SELECT count(*) AS n FROM items`);
  // Synthetic pairs carry no creating event; their random ids make "first by id" a random sample.
  const pairs = await db.all<{ id: string; identity: string }>(sql`
    SELECT id, identity FROM items WHERE kind = 'pair' AND created_event_id IS NULL ORDER BY id LIMIT ${SAMPLE}`);
  if (pairs.length < SAMPLE) throw new Error("bench: the register holds too few synthetic pairs");
  const pairIds = pairs.map((p) => p.id);
  const speakers = await db.all<{ identity: string }>(sql`
    SELECT parent_identity AS identity FROM links
    WHERE parent_kind = 'speaker' AND ended_at IS NULL AND child_id IN (
      SELECT l2.child_id FROM links l1 JOIN links l2 ON l2.parent_id = l1.child_id AND l2.position = 'T' AND l2.ended_at IS NULL
      WHERE l1.parent_id IN (${sql.join(pairIds.map((id) => sql`${id}`), sql`, `)}) AND l1.ended_at IS NULL)`);
  const driveUnits = await db.all<{ identity: string }>(sql`
    SELECT i.identity FROM links l1
    JOIN links l2 ON l2.parent_id = l1.child_id AND l2.position = 'T' AND l2.ended_at IS NULL
    JOIN items i ON i.id = l2.child_id
    WHERE l1.parent_id IN (${sql.join(pairIds.map((id) => sql`${id}`), sql`, `)}) AND l1.ended_at IS NULL`);
  // The lot held by the most pairs, counted through the holdings index (pairs and their speakers are the serials a recall names).
  const [lot] = await db.all<{ identity: string; serials: number }>(sql`
    SELECT i.identity, (SELECT count(*) FROM holdings h2 WHERE h2.item_id = i.id AND h2.holder_kind IN ('pair', 'speaker')) AS serials
    FROM items i WHERE i.kind = 'component_lot'
    ORDER BY (SELECT count(*) FROM holdings h WHERE h.item_id = i.id AND h.holder_kind = 'pair') DESC LIMIT 1`);
  if (!lot || lot.serials < MIN_LOT_SERIALS) throw new Error(`bench: no lot is held by ${MIN_LOT_SERIALS} serials`);
  const [cabinetPair] = await db.all<{ identity: string }>(sql`
    SELECT i.identity FROM route_records r JOIN items i ON i.id = r.pair_id WHERE i.kind = 'pair'
    GROUP BY r.pair_id ORDER BY count(*) DESC, i.identity LIMIT 1`);
  if (!cabinetPair) throw new Error("bench: no pair has route records (was the demo history seeded?)");
  const [serviceCase] = await db.all<{ code: string }>(sql`
    SELECT c.code FROM service_cases c ORDER BY (SELECT count(*) FROM case_findings f WHERE f.case_id = c.id) DESC, c.code LIMIT 1`);
  if (!serviceCase) throw new Error("bench: no service case (was the demo history seeded?)");
  const users = await db.all<{ role: string; id: string }>(sql`
    SELECT r.role, min(u.id) AS id FROM users u JOIN user_roles r ON r.user_id = u.id
    WHERE u.active = 1 AND u.email LIKE '%@demo.twinleaf.test' AND u.email = r.role || '@demo.twinleaf.test' GROUP BY r.role`);
  return {
    items: Number(count!.n),
    pairs: pairs.map((p) => p.identity),
    speakers: speakers.map((s) => s.identity),
    driveUnits: driveUnits.map((d) => d.identity),
    bulkLot: { identity: lot.identity, serials: Number(lot.serials) },
    cabinetPair: cabinetPair.identity,
    serviceCase: serviceCase.code,
    users: Object.fromEntries(users.map((u) => [u.role, u.id])),
  };
}
