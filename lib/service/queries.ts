/** Reads of the service desk: cases, their pair's shipment, warranty facts, history and messages. */
import "server-only";
import { and, asc, desc, eq, inArray, sql } from "drizzle-orm";
import { shippedAt, traceBackward, type TraceNode } from "@/lib/genealogy/trace";
import { speakersOf } from "@/lib/genealogy/pair-speakers";
import { compareTraces } from "./trace-diff";
import type { DbOrTx } from "@/db";
import { caseFindings, dealers, events, items, models, ownerships, serviceCases, users, type CaseFinding, type Item, type ServiceCase } from "@/db/schema";
import { DESK_REGISTRATION, ownerById, type OwnerWithConsent } from "@/lib/owners";
import { listOutbox, type OutboxEntry, type OutboxStatus } from "@/lib/mail/outbox";
import { workshopDay } from "@/lib/workshop-time";
import { OPEN_CASE_STATES, type CaseState } from "@/lib/vocabulary/case-states";
import { normaliseCaseCode } from "./code";
import { workOutWarranty, type Warranty } from "./warranty";
import { modelSpecOf } from "@/lib/workshop/model-spec-of";

export interface PairShipment {
  shipmentId: string;
  shipment: string;
  /** YYYY-MM-DD, the day it left as the packer recorded it (or, for older history, the day the shipment was made). */
  shippedOn: string;
  dealer: { id: string; code: string; name: string; city: string } | null;
}

/** The first shipment that ever held the pair (through its carton), with its day and dealer; null while unshipped. */
export async function shipmentOfPair(db: DbOrTx, pairId: string): Promise<PairShipment | null> {
  const rows = await db.all<{ id: string; identity: string; shipped_on: string | null; created_at: number; d_id: string | null; d_code: string | null; d_name: string | null; d_city: string | null; started_at: number }>(sql`
    WITH RECURSIVE up(id, depth) AS (
      SELECT ${pairId}, 0
      UNION
      SELECT l.parent_id, up.depth + 1 FROM links l JOIN up ON l.child_id = up.id WHERE up.depth < 6
    )
    SELECT s.id, s.identity, sd.shipped_on, s.created_at, d.id AS d_id, d.code AS d_code, d.name AS d_name, d.city AS d_city, l.started_at
    FROM up JOIN links l ON l.child_id = up.id AND l.parent_kind = 'shipment'
    JOIN items s ON s.id = l.parent_id
    LEFT JOIN shipment_details sd ON sd.item_id = s.id
    LEFT JOIN dealers d ON d.id = coalesce(sd.dealer_id, s.dealer_id)
    ORDER BY l.started_at LIMIT 1`);
  const r = rows[0];
  if (!r) return null;
  return {
    shipmentId: r.id,
    shipment: r.identity,
    shippedOn: r.shipped_on ?? workshopDay(new Date(Number(r.created_at))),
    dealer: r.d_id && r.d_code && r.d_name ? { id: r.d_id, code: r.d_code, name: r.d_name, city: r.d_city ?? "" } : null,
  };
}

/** The pair's open case, if it has one. */
export async function openCaseOfPair(db: DbOrTx, pairId: string): Promise<ServiceCase | null> {
  const [row] = await db
    .select()
    .from(serviceCases)
    .where(and(eq(serviceCases.pairId, pairId), inArray(serviceCases.state, [...OPEN_CASE_STATES])))
    .limit(1);
  return row ?? null;
}

/** A case by its code as typed ("rt2612-7" finds RT2612-0007), or null. */
export async function caseByCode(db: DbOrTx, code: string): Promise<ServiceCase | null> {
  const c = normaliseCaseCode(code);
  if (!c) return null;
  const [row] = await db.select().from(serviceCases).where(eq(serviceCases.code, c)).limit(1);
  return row ?? null;
}

/**
 * The warranty of a case's pair on the day it was received: the model's period, the ship day,
 * and the day an owner first registered the pair before the case was opened (an owner first
 * named at the desk does not move the start).
 */
export async function warrantyFacts(db: DbOrTx, c: Pick<ServiceCase, "pairId" | "receivedOn" | "openedAt">): Promise<Warranty | null> {
  // The warranty of the model version the pair was built under: a later edit does not change a sold pair's.
  const [row] = await db.select({ id: items.id, modelId: items.modelId }).from(items).where(eq(items.id, c.pairId)).limit(1);
  const spec = row ? await modelSpecOf(db, row) : null;
  const pair = spec ? { months: spec.warrantyMonths } : null;
  const shipment = await shipmentOfPair(db, c.pairId);
  if (!pair || !shipment) return null;
  // An owner the desk named at a service intake is on record, but did not register the pair.
  const [reg] = await db
    .select({ since: sql<number | null>`min(${ownerships.since})` })
    .from(ownerships)
    .innerJoin(events, eq(events.id, ownerships.eventId))
    .where(and(eq(ownerships.itemId, c.pairId), sql`${ownerships.since} < ${c.openedAt.getTime()}`, sql`coalesce(json_extract(${events.data}, '$.via'), '') <> ${DESK_REGISTRATION}`));
  const registeredOn = reg?.since ? workshopDay(new Date(Number(reg.since))) : null;
  return workOutWarranty({ shippedOn: shipment.shippedOn, registeredOn, months: pair.months, receivedOn: c.receivedOn });
}

export interface CaseListRow {
  id: string;
  code: string;
  state: CaseState;
  receivedOn: string;
  openedAt: Date;
  returnedBy: "owner" | "dealer";
  symptom: string;
  item: string;
  itemKind: string;
  pair: string;
  model: string | null;
  dealer: string | null;
}

/** Cases, oldest received first; only open ones unless a state is named. */
export async function listCases(db: DbOrTx, opts: { state?: CaseState; limit?: number } = {}): Promise<CaseListRow[]> {
  const item = sql`(SELECT identity FROM items WHERE id = ${serviceCases.itemId})`;
  const rows = await db
    .select({
      id: serviceCases.id,
      code: serviceCases.code,
      state: serviceCases.state,
      receivedOn: serviceCases.receivedOn,
      openedAt: serviceCases.openedAt,
      returnedBy: serviceCases.returnedBy,
      symptom: serviceCases.symptom,
      item: sql<string>`${item}`,
      itemKind: sql<string>`(SELECT kind FROM items WHERE id = ${serviceCases.itemId})`,
      pair: items.identity,
      model: models.name,
      dealer: dealers.name,
    })
    .from(serviceCases)
    .innerJoin(items, eq(items.id, serviceCases.pairId))
    .leftJoin(models, eq(models.id, items.modelId))
    .leftJoin(dealers, eq(dealers.id, serviceCases.dealerId))
    .where(opts.state ? eq(serviceCases.state, opts.state) : inArray(serviceCases.state, [...OPEN_CASE_STATES]))
    .orderBy(asc(serviceCases.receivedOn), asc(serviceCases.openedAt))
    .limit(opts.limit ?? 500);
  return rows;
}

export interface CaseEvent {
  id: number;
  at: Date;
  type: string;
  data: Record<string, unknown>;
  reason: string | null;
  actorName: string | null;
}

/** Everything recorded about the case, oldest first. */
export async function caseHistory(db: DbOrTx, caseId: string): Promise<CaseEvent[]> {
  return db
    .select({ id: events.id, at: events.at, type: events.type, data: events.data, reason: events.reason, actorName: users.name })
    .from(events)
    .leftJoin(users, eq(users.id, events.actorId))
    .where(and(eq(events.subjectKind, "case"), eq(events.subjectId, caseId)))
    .orderBy(asc(events.id));
}

export async function findingsOf(db: DbOrTx, caseId: string): Promise<CaseFinding[]> {
  return db.select().from(caseFindings).where(eq(caseFindings.caseId, caseId)).orderBy(asc(caseFindings.id));
}

export interface CaseMessage {
  /** The case event the message belongs to. */
  eventId: number;
  kind: string;
  /** What happened to it: queued (with its delivery state), or why none was sent. */
  outcome: "queued" | "no_owner" | "no_email" | "no_consent";
  outbox: { id: number; to: string; subject: string; status: OutboxStatus; attempts: number; sentAt: Date | null; lastError: string | null } | null;
  at: Date;
}

/**
 * The owner messages of a case: each case event that carries `ownerMail` names what was done, and
 * a queued message is read back from the outbox with its delivery state.
 */
export async function caseMessages(db: DbOrTx, caseId: string, history?: CaseEvent[]): Promise<CaseMessage[]> {
  const evs = (history ?? (await caseHistory(db, caseId))).filter((e) => e.data && typeof e.data.ownerMail === "object" && e.data.ownerMail !== null);
  if (evs.length === 0) return [];
  const rows = await listOutbox(db, { eventIds: evs.map((e) => e.id) });
  const byEvent = new Map<number | null, OutboxEntry>();
  for (const r of rows) if (!byEvent.has(r.eventId)) byEvent.set(r.eventId, r);
  return evs.map((e) => {
    const m = e.data.ownerMail as { kind?: string; outcome?: CaseMessage["outcome"] };
    const r = byEvent.get(e.id);
    return {
      eventId: e.id,
      kind: m.kind ?? "",
      outcome: m.outcome ?? "queued",
      at: e.at,
      outbox: r ? { id: r.id, to: r.to, subject: r.subject, status: r.status, attempts: r.attempts, sentAt: r.sentAt, lastError: r.lastError } : null,
    };
  });
}

export interface CaseParticulars {
  case: ServiceCase;
  item: { id: string; identity: string; kind: string; side: "L" | "R" | null };
  pair: { id: string; identity: string; modelId: string | null };
  partner: { id: string; identity: string } | null;
  speakers: { L: { id: string; identity: string } | null; R: { id: string; identity: string } | null };
  model: { id: string; code: string; name: string; warrantyMonths: number; positions: { position: string; partType: string }[] } | null;
  dealer: { code: string; name: string; city: string } | null;
  owner: OwnerWithConsent | null;
  shipment: PairShipment | null;
  warranty: Warranty | null;
}

/** The speakers a pair holds now (its L and R positions), by serial. */
export async function speakersOfPair(db: DbOrTx, pairId: string): Promise<CaseParticulars["speakers"]> {
  const both = await speakersOf(db, pairId);
  const pick = (i: Item | null) => (i ? { id: i.id, identity: i.identity } : null);
  return { L: pick(both.L), R: pick(both.R) };
}

/** A case with what it is about, in one call (a handful of small queries). */
export async function caseParticulars(db: DbOrTx, c: ServiceCase): Promise<CaseParticulars> {
  const [rows, speakers, shipment, warranty, owner] = await Promise.all([
    db.select({ id: items.id, identity: items.identity, kind: items.kind, modelId: items.modelId }).from(items).where(inArray(items.id, [c.itemId, c.pairId, ...(c.partnerId ? [c.partnerId] : [])])),
    speakersOfPair(db, c.pairId),
    shipmentOfPair(db, c.pairId),
    warrantyFacts(db, c),
    c.ownerId ? ownerById(db, c.ownerId) : Promise.resolve(null),
  ]);
  const byId = new Map(rows.map((r) => [r.id, r]));
  const item = byId.get(c.itemId)!;
  const pair = byId.get(c.pairId)!;
  const partner = c.partnerId ? byId.get(c.partnerId) ?? null : null;
  const side = item.kind === "speaker" ? (speakers.L?.id === item.id ? "L" : speakers.R?.id === item.id ? "R" : null) : null;
  let model: CaseParticulars["model"] = null;
  if (pair.modelId) {
    // The positions and warranty of the model version the pair was built under.
    const m = await modelSpecOf(db, pair);
    const positions = [...(m?.positions ?? [])].sort((a, b) => b.position.localeCompare(a.position));
    if (m) model = { id: m.id, code: m.code, name: m.name, warrantyMonths: m.warrantyMonths, positions: positions.map((p) => ({ position: p.position, partType: p.partType })) };
  }
  const [dealer] = c.dealerId ? await db.select({ code: dealers.code, name: dealers.name, city: dealers.city }).from(dealers).where(eq(dealers.id, c.dealerId)) : [];
  return {
    case: c,
    item: { id: item.id, identity: item.identity, kind: item.kind, side },
    pair: { id: pair.id, identity: pair.identity, modelId: pair.modelId },
    partner: partner ? { id: partner.id, identity: partner.identity } : null,
    speakers,
    model,
    dealer: dealer ?? null,
    owner,
    shipment,
    warranty,
  };
}

/** The parts the desk replaces; veneer leaves and component lots are read on the register's trace. */
const TRACE_KINDS = new Set(["speaker", "cabinet", "drive_unit", "crossover"]);

/**
 * What came back as built (the moment the pair shipped) and as it is now, compared: a part
 * removed since shipping and a part fitted are marked (lib/service/trace-diff.ts).
 */
export async function caseTraces(db: DbOrTx, c: Pick<ServiceCase, "itemId" | "pairId">) {
  const shipped = await shippedAt(db, c.pairId);
  const [built, current] = await Promise.all([shipped ? traceBackward(db, c.itemId, { mode: "at", at: shipped }) : Promise.resolve([]), traceBackward(db, c.itemId, { mode: "now" })]);
  const parts = (nodes: TraceNode[]) => {
    const name = new Map(nodes.map((n) => [n.id, n.identity]));
    return nodes
      .filter((n) => n.depth > 0 && TRACE_KINDS.has(n.kind))
      .map((n) => ({ id: n.id, identity: n.identity, kind: n.kind, holder: n.via ? (name.get(n.via) ?? null) : null, position: n.position, partType: n.partType }));
  };
  return { shippedAt: shipped, ...compareTraces(parts(built), parts(current)) };
}

/** The service cases a speaker or pair was part of (as the item that came back, its pair or its partner), newest first. */
export async function casesTouching(db: DbOrTx, itemId: string): Promise<Pick<ServiceCase, "code" | "state" | "receivedOn" | "itemId" | "partnerId">[]> {
  return db
    .select({ code: serviceCases.code, state: serviceCases.state, receivedOn: serviceCases.receivedOn, itemId: serviceCases.itemId, partnerId: serviceCases.partnerId })
    .from(serviceCases)
    .where(sql`${serviceCases.itemId} = ${itemId} OR ${serviceCases.pairId} = ${itemId} OR ${serviceCases.partnerId} = ${itemId}`)
    .orderBy(desc(serviceCases.openedAt));
}
