import "server-only";
import Fuse from "fuse.js";
import { inArray, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { dealers, items, owners } from "@/db/schema";
import { itemHref } from "@/lib/paths";
import { nearMisses, normaliseScan, serialReadings } from "@/lib/serials";

export type SearchHit =
  | { type: "item"; id: string; identity: string; kind: string; state: string; href: string }
  | { type: "dealer"; id: string; name: string; detail: string; href: string }
  | { type: "owner"; id: string; name: string; detail: string; href: string };

export interface SearchAnswer {
  query: string;
  /** The one item whose identity is exactly what was typed or scanned. */
  exact: SearchHit | null;
  /** For a serial whose check character does not fit: existing serials one slip away. */
  didYouMean: SearchHit[];
  fuzzy: SearchHit[];
}


const itemHit = (r: { id: string; identity: string; kind: string; state: string }): SearchHit => ({ type: "item", ...r, href: itemHref(r.identity) });

type Doc = { key: string; text: string; hit: SearchHit };

// The fuzzy index is rebuilt only when the register has grown or changed shape; the freshness
// check is one cheap aggregate query.
let cached: { stamp: string; fuse: Fuse<Doc> } | null = null;

async function fuzzyIndex(db: DbOrTx): Promise<Fuse<Doc>> {
  const [stamp] = await db.all<{ s: string }>(sql`
    SELECT (SELECT count(*) || ':' || coalesce(max(rowid), 0) FROM items) || '/' ||
           (SELECT count(*) FROM dealers) || '/' || (SELECT count(*) FROM owners) AS s`);
  if (cached && cached.stamp === stamp?.s) return cached.fuse;
  const [itemRows, dealerRows, ownerRows] = await Promise.all([
    // Leaves are found through their flitch; every other kind is searchable by identity.
    db.select({ id: items.id, identity: items.identity, kind: items.kind, state: items.state }).from(items).where(sql`${items.kind} <> 'leaf'`),
    db.select().from(dealers),
    db.select().from(owners),
  ]);
  const docs: Doc[] = [
    ...itemRows.map((r) => ({ key: r.identity, text: r.identity.replace(/-/g, " "), hit: itemHit(r) })),
    ...dealerRows.map((d) => ({
      key: d.name,
      text: `${d.code} ${d.city}`,
      hit: { type: "dealer" as const, id: d.id, name: d.name, detail: `${d.city}, ${d.country}`, href: `/register/dealers/${d.code}` },
    })),
    ...ownerRows.map((o) => ({
      key: o.name,
      text: `${o.town} ${o.email ?? ""}`,
      hit: { type: "owner" as const, id: o.id, name: o.name, detail: `${o.town}, ${o.country}`, href: `/register/owners/${o.id}` },
    })),
  ];
  const fuse = new Fuse(docs, { keys: [{ name: "key", weight: 3 }, { name: "text", weight: 1 }], threshold: 0.35, ignoreLocation: true, minMatchCharLength: 2 });
  cached = { stamp: stamp?.s ?? "", fuse };
  return fuse;
}

/**
 * The index is rebuilt only when items are added, so a state it holds may be old (a speaker
 * shipped since): the hits it found are read again for their state now.
 */
async function withCurrentStates(db: DbOrTx, hits: SearchHit[]): Promise<SearchHit[]> {
  const ids = hits.filter((h) => h.type === "item").map((h) => h.id);
  if (ids.length === 0) return hits;
  const rows = await db.select({ id: items.id, state: items.state }).from(items).where(inArray(items.id, ids));
  const state = new Map(rows.map((r) => [r.id, r.state]));
  return hits.map((h) => (h.type === "item" && state.has(h.id) ? { ...h, state: state.get(h.id)! } : h));
}

/**
 * Drive units whose maker's serial is `query`, and makers' lots whose lot code (or whole name) is
 * `query`, ignoring case: scans are upper-cased, makers print either. Both read indexed columns.
 */
async function makerMatches(db: DbOrTx, query: string) {
  return db.all<{ id: string; identity: string; kind: string; state: string }>(sql`
    SELECT i.id, i.identity, i.kind, i.state FROM batch_units bu JOIN items i ON i.id = bu.item_id
    WHERE bu.maker_serial = ${query} COLLATE NOCASE
    UNION
    SELECT i.id, i.identity, i.kind, i.state FROM items i
    WHERE i.kind = 'maker_lot' AND (json_extract(i.attrs, '$.lot') = ${query} COLLATE NOCASE OR i.identity = ${query} COLLATE NOCASE)
    ORDER BY 2 LIMIT 50`);
}

/** One box for scans and typing: exact serial, then "did you mean" for a check-character slip, then fuzzy. */
export async function search(db: DbOrTx, raw: string, limit = 10): Promise<SearchAnswer> {
  const query = normaliseScan(raw);
  const answer: SearchAnswer = { query, exact: null, didYouMean: [], fuzzy: [] };
  if (!query) return answer;

  // Typed without separators a serial can be read more than one way: try every reading.
  const readings = serialReadings(query);
  const candidates = [...new Set([query, ...readings.map((r) => r.canonical)])];
  const columns = { id: items.id, identity: items.identity, kind: items.kind, state: items.state };
  const found = await db.select(columns).from(items).where(inArray(items.identity, candidates)).limit(1);
  if (found[0]) {
    answer.exact = itemHit(found[0]);
    return answer;
  }

  // A maker's serial (from the unit's own label) or a maker's lot code, as typed or scanned.
  const byMaker = await makerMatches(db, query);
  if (byMaker.length === 1) {
    answer.exact = itemHit(byMaker[0]!);
    return answer;
  }

  // A check character that does not fit (or an O typed for a 0): the serials one slip away.
  if (!readings.some((r) => r.valid)) {
    const near = [...new Set([...readings.flatMap((r) => nearMisses(r.canonical)), ...nearMisses(query)])];
    if (near.length) {
      const rows = await db.select(columns).from(items).where(inArray(items.identity, near));
      answer.didYouMean = rows.map(itemHit);
    }
  }

  const fuse = await fuzzyIndex(db);
  const fuzzy = fuse
    .search(query, { limit: limit + answer.didYouMean.length })
    .map((r) => r.item.hit)
    .filter((h) => !answer.didYouMean.some((d) => d.id === h.id) && !byMaker.some((m) => m.id === h.id));
  // Several units share a maker's serial only across makers' batches: all of them lead the list.
  fuzzy.unshift(...byMaker.map(itemHit));
  fuzzy.splice(Math.max(limit, byMaker.length));
  answer.fuzzy = await withCurrentStates(db, fuzzy);
  return answer;
}
