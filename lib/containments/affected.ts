import "server-only";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import type { AffectedGroup } from "@/lib/vocabulary/containments";

/** The kinds a containment lists: what is built, sold and serviced, and parts in stock. */
export const LISTED_KINDS = ["pair", "speaker", "cabinet", "drive_unit", "crossover", "trim_part", "leaf"] as const;
/** Parts listed on their own only while no speaker or pair holds them. */
const WHOLE_KINDS = ["pair", "speaker"];

export interface AffectedRow {
  itemId: string;
  kind: string;
  identity: string;
  state: string;
  pairId: string | null;
  group: AffectedGroup;
  dealerId: string | null;
}

/**
 * Where an affected serial is now, from its pair's state (or its own, for a part in stock): a
 * pair that shipped is out with its dealer; a packed one waits at dispatch; any other pair is
 * still in build. A part no speaker or pair holds is in stock, unless it is a cabinet on its way
 * through the shop.
 */
export function groupOf(row: { pairId: string | null; kind: string; state: string; pairState: string | null }): AffectedGroup {
  if (row.pairId) {
    if (row.pairState === "shipped") return "shipped";
    if (row.pairState === "packed") return "packed";
    return "in_build";
  }
  if (row.kind === "cabinet" && row.state === "in_progress") return "in_build";
  // A trim part on its own route (sanded, painted, polished) is in the shop's work, not on a shelf.
  if (row.kind === "trim_part" && row.state === "in_route") return "in_build";
  return "in_stock";
}

const kindList = (kinds: readonly string[]) => sql.join(kinds.map((k) => sql`${k}`), sql`, `);

/**
 * The serials a containment of these candidate items lists, with their group and dealer. A
 * candidate is listed when it is a pair or a speaker, or a part that no speaker or pair holds (a
 * drive unit in stock, a leaf not yet laid); scrapped things are left out. `candidates` gives
 * (id, kind) rows. Reads the holdings index in one statement, so thousands of serials are one read.
 */
async function rowsOf(db: DbOrTx, candidates: ReturnType<typeof sql>): Promise<AffectedRow[]> {
  const rows = await db.all<{ id: string; kind: string; identity: string; state: string; pair_id: string | null; pair_state: string | null; dealer_id: string | null }>(sql`
    WITH cand(id, kind) AS (${candidates}),
    -- Kinds and holders are judged from the holdings index first, so only the serials listed are
    -- read from items (a lot's cartons, shipments and crossovers inside speakers never are).
    listed AS (
      SELECT i.id, i.kind, i.identity, i.state,
             CASE WHEN i.kind = 'pair' THEN i.id
                  ELSE (SELECT h.holder_id FROM holdings h WHERE h.item_id = i.id AND h.holder_kind = 'pair' LIMIT 1) END AS pair_id
      FROM (SELECT DISTINCT id, kind FROM cand
            WHERE kind IN (${kindList(LISTED_KINDS)})
              AND (kind IN (${kindList(WHOLE_KINDS)})
                   OR NOT EXISTS (SELECT 1 FROM holdings h WHERE h.item_id = cand.id AND h.holder_kind IN (${kindList(WHOLE_KINDS)})))) c
      JOIN items i ON i.id = c.id
      WHERE i.state <> 'scrapped'
    )
    SELECT l.id, l.kind, l.identity, l.state, l.pair_id, p.state AS pair_state,
           (SELECT coalesce(sd.dealer_id, s.dealer_id) FROM holdings hs JOIN items s ON s.id = hs.holder_id
              LEFT JOIN shipment_details sd ON sd.item_id = s.id
            WHERE hs.item_id = l.pair_id AND hs.holder_kind = 'shipment' LIMIT 1) AS dealer_id
    FROM listed l LEFT JOIN items p ON p.id = l.pair_id`);
  const cmp = (x: string, y: string) => (x < y ? -1 : x > y ? 1 : 0);
  return rows
    .map((r) => ({
      itemId: r.id,
      kind: r.kind,
      identity: r.identity,
      state: r.state,
      pairId: r.pair_id,
      group: groupOf({ pairId: r.pair_id, kind: r.kind, state: r.state, pairState: r.pair_state }),
      dealerId: r.pair_state === "shipped" ? r.dealer_id : null,
    }))
    .sort((a, b) => cmp(a.kind === "pair" ? "0" : "1", b.kind === "pair" ? "0" : "1") || cmp(a.identity, b.identity));
}

/**
 * Everything that holds `itemId` today (through any depth of open links), and the item itself; for
 * a pair, its speakers too (they are its parts, but held by it, not holding it).
 */
export function affectedByItem(db: DbOrTx, itemId: string): Promise<AffectedRow[]> {
  return rowsOf(
    db,
    sql`SELECT id, kind FROM items WHERE id = ${itemId}
        UNION ALL SELECT holder_id, holder_kind FROM holdings WHERE item_id = ${itemId}
        UNION ALL SELECT s.id, s.kind FROM items t JOIN holdings h ON h.holder_id = t.id JOIN items s ON s.id = h.item_id
          WHERE t.id = ${itemId} AND t.kind = 'pair' AND s.kind = 'speaker'`,
  );
}

/** The pairs a station's steps in a window were recorded for, with their speakers (from ../route/readings). */
export function affectedByPairs(db: DbOrTx, pairIds: string[]): Promise<AffectedRow[]> {
  if (pairIds.length === 0) return Promise.resolve([]);
  const json = JSON.stringify([...new Set(pairIds)]);
  return rowsOf(
    db,
    sql`SELECT i.id, i.kind FROM json_each(${json}) j JOIN items i ON i.id = j.value
        UNION ALL SELECT s.id, s.kind FROM json_each(${json}) j JOIN holdings h ON h.holder_id = j.value JOIN items s ON s.id = h.item_id
          WHERE h.holder_kind = 'pair' AND s.kind = 'speaker'`,
  );
}
