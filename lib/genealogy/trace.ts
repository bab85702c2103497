import "server-only";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import type { ItemKind } from "@/db/schema";

/**
 * Which moment a trace describes: the register now, as it stood at a date, or everything that
 * was ever linked (history, for the service desk: every part that ever went into a serial).
 */
export type TraceMoment = { mode: "now" } | { mode: "at"; at: Date } | { mode: "ever" };

export interface TraceNode {
  id: string;
  kind: ItemKind;
  identity: string;
  state: string;
  partType: string | null;
  modelId: string | null;
  finishId: string | null;
  dealerId: string | null;
  attrs: Record<string, unknown>;
  /** The item this one was reached from (its parent going backward, its child going forward). */
  via: string | null;
  position: string | null;
  depth: number;
  linkId: number | null;
  startedAt: Date | null;
  endedAt: Date | null;
}

// A guard against a damaged graph: the code refuses cycles, and no real assembly is this deep.
const MAX_DEPTH = 24;

function momentFilter(m: TraceMoment) {
  if (m.mode === "now") return sql`l.ended_at IS NULL`;
  if (m.mode === "at") return sql`l.started_at <= ${m.at.getTime()} AND (l.ended_at IS NULL OR l.ended_at > ${m.at.getTime()})`;
  return sql`1 = 1`;
}

type Row = {
  id: string; kind: ItemKind; identity: string; state: string; part_type: string | null; model_id: string | null;
  finish_id: string | null; dealer_id: string | null; attrs: string; via: string | null; position: string | null;
  depth: number; link_id: number | null; started_at: number | null; ended_at: number | null;
};

const toNode = (r: Row): TraceNode => ({
  id: r.id,
  kind: r.kind,
  identity: r.identity,
  state: r.state,
  partType: r.part_type,
  modelId: r.model_id,
  finishId: r.finish_id,
  dealerId: r.dealer_id,
  attrs: typeof r.attrs === "string" ? (JSON.parse(r.attrs) as Record<string, unknown>) : {},
  via: r.via,
  position: r.position,
  depth: Number(r.depth),
  linkId: r.link_id === null ? null : Number(r.link_id),
  startedAt: r.started_at === null ? null : new Date(Number(r.started_at)),
  endedAt: r.ended_at === null ? null : new Date(Number(r.ended_at)),
});

/** Everything inside an item at a moment, the item itself first (depth 0). One recursive query. */
export async function traceBackward(db: DbOrTx, rootId: string, moment: TraceMoment = { mode: "now" }): Promise<TraceNode[]> {
  const rows = await db.all<Row>(sql`
    WITH RECURSIVE down(id, via, position, depth, link_id, started_at, ended_at) AS (
      SELECT ${rootId}, NULL, NULL, 0, NULL, NULL, NULL
      UNION ALL
      SELECT l.child_id, l.parent_id, l.position, down.depth + 1, l.id, l.started_at, l.ended_at
      FROM links l JOIN down ON l.parent_id = down.id
      WHERE ${momentFilter(moment)} AND down.depth < ${MAX_DEPTH}
    )
    SELECT i.id, i.kind, i.identity, i.state, i.part_type, i.model_id, i.finish_id, i.dealer_id, i.attrs,
           down.via, down.position, down.depth, down.link_id, down.started_at, down.ended_at
    FROM down JOIN items i ON i.id = down.id
    ORDER BY down.depth, down.via, down.position, down.started_at`);
  return rows.map(toNode);
}

export interface HolderNode {
  id: string;
  kind: ItemKind;
  identity: string;
}

// Holders are listed from the nearest kind outwards.
const HOLDER_ORDER: Record<string, number> = {
  flitch: 0, leaf: 1, maker_lot: 2, unit_batch: 3, component_lot: 4, drive_unit: 5, crossover: 6, cabinet: 7, speaker: 8, pair: 9, carton: 10, shipment: 11,
};
const byHolderOrder = (a: { kind: string }, b: { kind: string }) => (HOLDER_ORDER[a.kind] ?? 99) - (HOLDER_ORDER[b.kind] ?? 99);

/**
 * Everything that holds an item at a moment (its parents, theirs… up to shipments), the item
 * itself first, each holder once. "Now" reads the holdings index, kept by fit and removeFrom, in
 * one indexed query, so recalling a lot held by thousands of serials is one range read. Another
 * moment walks the links in one recursive query: a link carries its parent's kind and identity,
 * so the walk never visits the items table. Either answer comes back as one JSON value.
 */
export async function traceForward(db: DbOrTx, rootId: string, moment: TraceMoment = { mode: "now" }): Promise<HolderNode[]> {
  const [root] = await db.all<{ kind: ItemKind; identity: string }>(sql`SELECT kind, identity FROM items WHERE id = ${rootId}`);
  if (!root) return [];
  const [row] =
    moment.mode === "now"
      ? await db.all<{ j: string | null }>(sql`
          SELECT json_group_array(json_array(holder_id, holder_kind, holder_identity)) AS j
          FROM holdings WHERE item_id = ${rootId}`)
      : await db.all<{ j: string | null }>(sql`
          WITH RECURSIVE up(id, kind, identity, depth) AS (
            SELECT ${rootId}, ${root.kind}, ${root.identity}, 0
            UNION
            SELECT l.parent_id, l.parent_kind, l.parent_identity, up.depth + 1
            FROM links l JOIN up ON l.child_id = up.id
            WHERE ${momentFilter(moment)} AND up.depth < ${MAX_DEPTH}
          )
          SELECT json_group_array(json_array(id, kind, identity)) AS j FROM (SELECT DISTINCT id, kind, identity FROM up WHERE depth > 0)`);
  const holders = (JSON.parse(row?.j ?? "[]") as [string, ItemKind, string][]).map(([id, kind, identity]) => ({ id, kind, identity }));
  // Plain code-unit order: identities are ASCII, and localeCompare is far slower on a lot recall.
  const cmp = (x: string, y: string) => (x < y ? -1 : x > y ? 1 : 0);
  holders.sort((a, b) => byHolderOrder(a, b) || cmp(a.identity, b.identity));
  return [{ id: rootId, kind: root.kind, identity: root.identity }, ...holders];
}

/** What a page shows of an item's holders: how many of each kind, the first rows, and the shipments. */
export interface HolderView {
  /** Every holder, the item itself not counted. */
  count: number;
  /** How many of each kind, nearest kind first. */
  byKind: { kind: ItemKind; n: number }[];
  /** The first `rows` holders in the trace's order (nearest kind first, then serial). */
  first: HolderNode[];
  /** Every shipment among them, by serial. */
  shipments: HolderNode[];
}

/**
 * `traceForward` as a page shows it. "Now" is read from the holdings index without fetching every
 * holder: the counts per kind, the first `rows` and the shipments, each by one indexed query, so a
 * lot held by fifteen thousand serials costs a few hundred rows. Another moment walks the links
 * (`traceForward`) and summarises that.
 */
export async function holderView(db: DbOrTx, rootId: string, moment: TraceMoment, rows: number): Promise<HolderView> {
  if (moment.mode !== "now") {
    const holders = (await traceForward(db, rootId, moment)).slice(1);
    const counts = new Map<ItemKind, number>();
    for (const h of holders) counts.set(h.kind, (counts.get(h.kind) ?? 0) + 1);
    return {
      count: holders.length,
      byKind: [...counts].map(([kind, n]) => ({ kind, n })).sort(byHolderOrder),
      first: holders.slice(0, rows),
      shipments: holders.filter((h) => h.kind === "shipment"),
    };
  }
  const order = sql.raw(`CASE holder_kind ${Object.entries(HOLDER_ORDER).map(([k, n]) => `WHEN '${k}' THEN ${n}`).join(" ")} ELSE 99 END`);
  const [kinds, first, shipments] = await Promise.all([
    db.all<{ kind: ItemKind; n: number }>(sql`SELECT holder_kind AS kind, count(*) AS n FROM holdings WHERE item_id = ${rootId} GROUP BY holder_kind`),
    db.all<{ id: string; kind: ItemKind; identity: string }>(sql`
      SELECT holder_id AS id, holder_kind AS kind, holder_identity AS identity FROM holdings
      WHERE item_id = ${rootId} ORDER BY ${order}, holder_identity LIMIT ${rows}`),
    db.all<{ id: string; kind: ItemKind; identity: string }>(sql`
      SELECT holder_id AS id, holder_kind AS kind, holder_identity AS identity FROM holdings
      WHERE item_id = ${rootId} AND holder_kind = 'shipment' ORDER BY holder_identity`),
  ]);
  const byKind = kinds.map((k) => ({ kind: k.kind, n: Number(k.n) })).sort(byHolderOrder);
  return { count: byKind.reduce((sum, k) => sum + k.n, 0), byKind, first, shipments };
}

/**
 * When the item left the workshop as built: the first time it (or anything holding it) was put
 * into a shipment. Null while it has never shipped.
 *
 * Everything that ever held the item is what holds it now (the holdings index) plus, for each
 * ended link out of the item or out of a holder of it now, the old parent and everything that
 * ever held that. So the answer is read from the holdings index and the few ended links, instead
 * of walking every link up from a lot held by thousands of serials (18,000 holders, 0.2–0.8 s).
 */
export async function shippedAt(db: DbOrTx, itemId: string): Promise<Date | null> {
  const seen = new Set<string>();
  const walk = async (id: string, depth: number): Promise<number | null> => {
    if (seen.has(id) || depth > MAX_DEPTH) return null;
    seen.add(id);
    const rows = await db.all<{ parent_id: string | null; parent_kind: string | null; started_at: number | null; ended: number }>(sql`
      SELECT NULL AS parent_id, 'shipment' AS parent_kind, min((
        -- Each shipment that holds it now: the first open fitting into it of the item or of a holder of it.
        SELECT l.started_at FROM links l
        WHERE l.parent_id = h.holder_id AND l.ended_at IS NULL
          AND (l.child_id = ${id} OR EXISTS (SELECT 1 FROM holdings c WHERE c.item_id = ${id} AND c.holder_id = l.child_id))
        ORDER BY l.started_at LIMIT 1)) AS started_at, 0 AS ended
      FROM holdings h WHERE h.item_id = ${id} AND h.holder_kind = 'shipment'
      UNION ALL
      SELECT l.parent_id, l.parent_kind, l.started_at, 1 FROM links l WHERE l.child_id = ${id} AND l.ended_at IS NOT NULL
      UNION ALL
      SELECT l.parent_id, l.parent_kind, l.started_at, 1
      FROM holdings h JOIN links l ON l.child_id = h.holder_id AND l.ended_at IS NOT NULL
      WHERE h.item_id = ${id}`);
    let first: number | null = null;
    const take = (at: number | null) => {
      if (at !== null && (first === null || at < first)) first = at;
    };
    for (const r of rows) {
      if (r.started_at === null) continue;
      if (r.parent_kind === "shipment") take(Number(r.started_at));
      if (r.ended && r.parent_id) take(await walk(r.parent_id, depth + 1));
    }
    return first;
  };
  const at = await walk(itemId, 0);
  return at === null ? null : new Date(at);
}

/**
 * The holders of an item now (its open links to parents), oldest first: one for a part, thousands
 * for a lot. With `limit`, only the first few are read; `count` is always the whole number.
 */
export async function currentParent(db: DbOrTx, itemId: string, limit?: number) {
  const rows = await db.all<{ id: string; identity: string; kind: ItemKind; position: string; started_at: number }>(sql`
    SELECT p.id, p.identity, p.kind, l.position, l.started_at
    FROM links l JOIN items p ON p.id = l.parent_id
    WHERE l.child_id = ${itemId} AND l.ended_at IS NULL
    ORDER BY l.started_at${limit === undefined ? sql`` : sql` LIMIT ${limit}`}`);
  return rows.map((r) => ({ id: r.id, identity: r.identity, kind: r.kind, position: r.position, since: new Date(Number(r.started_at)) }));
}

/** How many hold the item now (read from the covering index of open links alone). */
export async function currentParentCount(db: DbOrTx, itemId: string): Promise<number> {
  // Named, since the planner would take links_up and read 5,000 table rows for a lot's ended_at.
  const [row] = await db.all<{ n: number }>(sql`SELECT count(*) AS n FROM links INDEXED BY links_open_holders WHERE child_id = ${itemId} AND ended_at IS NULL`);
  return Number(row?.n ?? 0);
}

export interface TraceTree extends TraceNode {
  children: TraceTree[];
}

/** Arranges a trace as a tree (by `via`), for pictures; in history mode a part can show under several holders. */
export function toTree(nodes: TraceNode[]): TraceTree | null {
  const root = nodes.find((n) => n.depth === 0);
  if (!root) return null;
  const byVia = new Map<string, TraceNode[]>();
  for (const n of nodes) {
    if (n.depth === 0 || !n.via) continue;
    const list = byVia.get(n.via) ?? [];
    list.push(n);
    byVia.set(n.via, list);
  }
  const build = (n: TraceNode, seen: Set<string>): TraceTree => {
    const next = new Set(seen).add(n.id);
    return { ...n, children: (byVia.get(n.id) ?? []).filter((c) => !next.has(c.id)).map((c) => build(c, next)) };
  };
  return build(root, new Set());
}
