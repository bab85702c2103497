import "server-only";
import Fuse from "fuse.js";
import { inArray, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { items } from "@/db/schema";
import type { Permission } from "@/lib/auth/permissions";
import { paths, itemHref } from "@/lib/paths";
import { nearMisses, normaliseScan, serialReadings } from "@/lib/serials";
import { normaliseCaseCode } from "@/lib/service/code";
import type { CaseState } from "@/lib/vocabulary/case-states";
import { compactText, MIN_FRAGMENT, phrase, typoPieces } from "./text";

/** What an item was found by when it was not its own identity. */
export type FoundBy = "maker_serial" | "log_reference" | "tracking";

export type SearchHit =
  | { type: "item"; id: string; identity: string; kind: string; state: string; href: string; via?: { by: FoundBy; text: string } }
  | { type: "dealer"; id: string; name: string; detail: string; href: string }
  | { type: "owner"; id: string; name: string; detail: string; href: string }
  | { type: "case"; id: string; code: string; state: CaseState; about: string; href: string }
  | { type: "containment"; id: string; code: string; about: string; open: boolean; href: string };

export interface SearchAnswer {
  query: string;
  /** The one item whose identity is exactly what was typed or scanned. */
  exact: SearchHit | null;
  /** For a serial whose check character does not fit: existing serials one slip away. */
  didYouMean: SearchHit[];
  /** Everything else whose text holds what was typed, best first. */
  fuzzy: SearchHit[];
}

/** What the person searching may open: a hit never names what its page would refuse. */
export interface SearchScope {
  permissions: ReadonlySet<Permission>;
}

/** Index rows read for one query: enough to rank well, few enough that ranking costs nothing. */
export const CANDIDATES = 200;
const TYPO_CANDIDATES = 50;

type Source = "item" | FoundBy | "case" | "containment" | "dealer" | "owner";
/** Sources whose ref is an item: the item itself, or the text it was found by. */
const ITEM_SOURCES: readonly Source[] = ["item", "maker_serial", "log_reference", "tracking"];
const isItemSource = (source: Source): source is "item" | FoundBy => ITEM_SOURCES.includes(source);
type Candidate = { source: Source; ref: string; text: string };
type ItemRow = { id: string; identity: string; kind: string; state: string };

const itemHit = (r: ItemRow, via?: { by: FoundBy; text: string }): SearchHit => ({
  type: "item", id: r.id, identity: r.identity, kind: r.kind, state: r.state, href: itemHref(r.identity), ...(via ? { via } : {}),
});

/** Sources a page guards beyond register.read: a service case opens only for the service desk. */
function allowed(source: Source, scope: SearchScope): boolean {
  if (source === "case") return scope.permissions.has("service.work");
  return scope.permissions.has("register.read");
}

/**
 * Drive units whose maker's serial is `query`, and makers' lots whose lot code (or whole name) is
 * `query`, ignoring case: scans are upper-cased, makers print either. Each part reads its own
 * NOCASE index (the search_index migration), written exactly as the index's expression.
 */
async function makerMatches(db: DbOrTx, query: string) {
  return db.all<ItemRow>(sql`
    SELECT i.id, i.identity, i.kind, i.state FROM batch_units bu JOIN items i ON i.id = bu.item_id
    WHERE bu.maker_serial = ${query} COLLATE NOCASE
    UNION
    SELECT i.id, i.identity, i.kind, i.state FROM items i
    WHERE i.kind = 'maker_lot' AND json_extract(i.attrs, '$.lot') = ${query} COLLATE NOCASE
    UNION
    SELECT i.id, i.identity, i.kind, i.state FROM items i
    WHERE i.kind = 'maker_lot' AND i.identity = ${query} COLLATE NOCASE
    ORDER BY 2 LIMIT 50`);
}

/**
 * Index rows whose text holds `text` anywhere (a trigram phrase match). No ORDER BY: the first
 * CANDIDATES rows FTS5 meets are read and the rest never touched, however common the fragment.
 * CROSS JOIN keeps the FTS table the outer loop (SQLite does not reorder it), so search_keys is
 * only read by primary key for the rows found.
 */
async function phraseCandidates(db: DbOrTx, table: "search_text" | "search_people", text: string): Promise<Candidate[]> {
  return db.all<Candidate>(sql`
    SELECT k.source, k.ref, t.text FROM ${sql.identifier(table)} t CROSS JOIN search_keys k ON k.id = t.rowid
    WHERE ${sql.identifier(table)} MATCH ${phrase(text)} LIMIT ${CANDIDATES}`);
}

/**
 * A name with a typo ("Quilon"): dealers and owners holding any piece of the query that a single
 * slip leaves whole (its halves and thirds), best first by FTS5's bm25, so those holding more of
 * it lead. Only the people table is read, and whole pieces match far fewer rows than single
 * trigrams would; fuse.js then keeps those close enough to what was typed.
 */
async function typoCandidates(db: DbOrTx, text: string): Promise<Candidate[]> {
  const pieces = typoPieces(text);
  if (pieces.length < 2) return [];
  const rows = await db.all<Candidate>(sql`
    SELECT k.source, k.ref, t.text FROM search_people t CROSS JOIN search_keys k ON k.id = t.rowid
    WHERE search_people MATCH ${pieces.join(" OR ")} ORDER BY rank LIMIT ${TYPO_CANDIDATES}`);
  const fuse = new Fuse(rows, { keys: ["text"], threshold: 0.35, ignoreLocation: true, includeScore: true });
  return fuse.search(text).map((r) => r.item);
}

/** Whole text first, then text that starts with the query, then the rest; shorter text first within each. */
function rank(query: string, candidates: Candidate[]): Candidate[] {
  const q = query.toLowerCase();
  const score = (c: Candidate) => {
    const t = c.text.toLowerCase();
    return t === q ? 0 : t.startsWith(q) ? 1 : 2;
  };
  return candidates
    .map((c) => ({ c, s: score(c) }))
    .sort((a, b) => a.s - b.s || a.c.text.length - b.c.text.length || a.c.text.localeCompare(b.c.text))
    .map(({ c }) => c);
}

/** The chosen candidates as hits, read now (current states and names), in the candidates' order. */
async function toHits(db: DbOrTx, chosen: Candidate[]): Promise<SearchHit[]> {
  const refs = (s: Source[]) => [...new Set(chosen.filter((c) => s.includes(c.source)).map((c) => c.ref))];
  const itemIds = refs([...ITEM_SOURCES]);
  const list = (ids: string[]) => sql.join(ids.map((id) => sql`${id}`), sql`, `);
  const none = Promise.resolve([]);
  const [itemRows, viaRows, dealerRows, ownerRows, caseRows, containmentRows] = await Promise.all([
    itemIds.length ? db.all<ItemRow>(sql`SELECT id, identity, kind, state FROM items WHERE id IN (${list(itemIds)})`) : none,
    itemIds.length
      ? db.all<{ by: FoundBy; ref: string; text: string }>(sql`
          SELECT 'maker_serial' AS by, item_id AS ref, maker_serial AS text FROM batch_units WHERE item_id IN (${list(itemIds)}) AND maker_serial IS NOT NULL
          UNION ALL SELECT 'log_reference', item_id, log_reference FROM flitches WHERE item_id IN (${list(itemIds)})
          UNION ALL SELECT 'tracking', item_id, tracking FROM shipment_details WHERE item_id IN (${list(itemIds)})`)
      : none,
    refs(["dealer"]).length
      ? db.all<{ id: string; code: string; name: string; city: string; country: string }>(sql`SELECT id, code, name, city, country FROM dealers WHERE id IN (${list(refs(["dealer"]))})`)
      : none,
    refs(["owner"]).length
      ? db.all<{ id: string; name: string; town: string; country: string }>(sql`SELECT id, name, town, country FROM owners WHERE id IN (${list(refs(["owner"]))})`)
      : none,
    refs(["case"]).length
      ? db.all<{ id: string; code: string; state: CaseState; about: string }>(sql`
          SELECT c.id, c.code, c.state, i.identity AS about FROM service_cases c JOIN items i ON i.id = c.item_id WHERE c.id IN (${list(refs(["case"]))})`)
      : none,
    refs(["containment"]).length
      ? db.all<{ id: string; code: string; about: string; closed_at: number | null }>(sql`
          SELECT id, code, target_label AS about, closed_at FROM containments WHERE id IN (${list(refs(["containment"]))})`)
      : none,
  ]);
  const byId = <T extends { id: string }>(rows: T[]) => new Map(rows.map((r) => [r.id, r]));
  const item = byId(itemRows);
  const via = new Map(viaRows.map((r) => [`${r.by}:${r.ref}`, r.text]));
  const dealer = byId(dealerRows);
  const owner = byId(ownerRows);
  const serviceCase = byId(caseRows);
  const containment = byId(containmentRows);

  const out: SearchHit[] = [];
  for (const c of chosen) {
    if (isItemSource(c.source)) {
      const r = item.get(c.ref);
      if (r) out.push(c.source === "item" ? itemHit(r) : itemHit(r, { by: c.source, text: via.get(`${c.source}:${c.ref}`) ?? "" }));
    } else if (c.source === "dealer") {
      const d = dealer.get(c.ref);
      if (d) out.push({ type: "dealer", id: d.id, name: d.name, detail: `${d.city}, ${d.country}`, href: paths.dealer(d.code) });
    } else if (c.source === "owner") {
      const o = owner.get(c.ref);
      if (o) out.push({ type: "owner", id: o.id, name: o.name, detail: `${o.town}, ${o.country}`, href: paths.owner(o.id) });
    } else if (c.source === "case") {
      const s = serviceCase.get(c.ref);
      if (s) out.push({ type: "case", id: s.id, code: s.code, state: s.state, about: s.about, href: paths.serviceCase(s.code) });
    } else {
      const k = containment.get(c.ref);
      if (k) out.push({ type: "containment", id: k.id, code: k.code, about: k.about, open: k.closed_at === null, href: paths.containment(k.code) });
    }
  }
  return out;
}

const everyone: SearchScope = { permissions: new Set<Permission>(["register.read"]) };

/**
 * One box for scans and typing: exact serial, a maker's serial or lot, "did you mean" for a
 * check-character slip, then every indexed text (serials, lots, batch codes, log references,
 * tracking numbers, case and containment codes, dealers, owners) that holds what was typed.
 * Reads at most a few hundred index rows whatever the register's size.
 */
export async function search(db: DbOrTx, raw: string, limit = 10, scope: SearchScope = everyone): Promise<SearchAnswer> {
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

  // A service case's code typed loosely ("rt2612-7") opens the case for those who may.
  const caseCode = normaliseCaseCode(query);
  if (caseCode && allowed("case", scope)) {
    const [c] = await toHits(db, await db.all<Candidate>(sql`SELECT 'case' AS source, id AS ref, code AS text FROM service_cases WHERE code = ${caseCode}`));
    if (c) {
      answer.exact = c;
      return answer;
    }
  }

  // A check character that does not fit (or an O typed for a 0): the serials one slip away.
  if (!readings.some((r) => r.valid)) {
    const near = [...new Set([...readings.flatMap((r) => nearMisses(r.canonical)), ...nearMisses(query)])];
    if (near.length) {
      const rows = await db.select(columns).from(items).where(inArray(items.identity, near));
      answer.didYouMean = rows.map((r) => itemHit(r));
    }
  }

  const text = compactText(query);
  let chosen: Candidate[] = [];
  // A caller asking for the exact answer only (limit 0) reads no index, nor does a whole serial
  // with a slipped check character once its suggestions are found: no other text holds it, and
  // a phrase of a dozen digit-heavy trigrams is the dearest match there is.
  if (limit > 0 && answer.didYouMean.length === 0 && [...text].length >= MIN_FRAGMENT) {
    const [things, people] = await Promise.all([phraseCandidates(db, "search_text", text), phraseCandidates(db, "search_people", text)]);
    chosen = rank(text, [...things, ...people]);
    // Only when nothing holds the text as typed: an OR of trigrams is the one read here whose cost
    // grows with the number of people, so a name typed right never pays for it.
    if (chosen.length === 0) chosen = await typoCandidates(db, text);
  }
  const taken = new Set([...answer.didYouMean, ...byMaker.map((r) => itemHit(r))].map((h) => `${h.type}:${h.id}`));
  const itemKey = (c: Candidate) => (isItemSource(c.source) ? `item:${c.ref}` : `${c.source}:${c.ref}`);
  const picked: Candidate[] = [];
  for (const c of chosen) {
    if (picked.length >= limit) break;
    if (!allowed(c.source, scope) || taken.has(itemKey(c))) continue;
    taken.add(itemKey(c));
    picked.push(c);
  }
  // Several units share a maker's serial only across makers' batches: all of them lead the list.
  const fuzzy = [...byMaker.map((r) => itemHit(r)), ...(await toHits(db, picked))];
  answer.fuzzy = fuzzy.slice(0, Math.max(limit, byMaker.length));
  return answer;
}
