import "server-only";
import { and, desc, eq, inArray, notInArray, or, sql, type SQL } from "drizzle-orm";
import { alias, type SQLiteColumn } from "drizzle-orm/sqlite-core";
import type { DbOrTx } from "@/db";
import { dealers, events, finishes, items, machineTokens, matchedSets, models, unitBatches, users } from "@/db/schema";
import { eventHash, type StoredEvent } from "@/lib/audit/chain";
import { chainHead } from "@/lib/audit/head";
import { now } from "@/lib/clock";
import { AREAS } from "@/lib/areas";
import type { Permission } from "@/lib/auth/permissions";
import type { EventType } from "@/lib/vocabulary/event-types";
import type { Station } from "@/lib/vocabulary/stations";

export interface NewEvent {
  actorId: string | null;
  station: Station;
  type: EventType;
  subjectKind: string;
  subjectId: string;
  data?: Record<string, unknown>;
  reason?: string | null;
  correctsId?: number | null;
  /**
   * When it happened: tests that build a register by hand set it. Left out (as the application
   * always leaves it), it is the register's clock, `now()` in lib/clock.ts.
   */
  at?: Date;
}

/**
 * Appends one event and returns its id. Call it inside the transaction that makes the change.
 * The event is chained (lib/audit/chain.ts): its id, its previous hash and its own hash are worked
 * out here from the newest event, read inside the same BEGIN IMMEDIATE transaction so no other
 * writer can append in between; handed the database rather than a transaction, it opens one.
 */
export async function appendEvent(db: DbOrTx, event: NewEvent): Promise<number> {
  // A transaction is told apart by its rollback(), not instanceof: a bundler may load drizzle's
  // classes twice, and a wrong answer here would nest savepoints without end.
  return "rollback" in db ? appendInTransaction(db, event) : db.transaction((tx) => appendInTransaction(tx, event));
}

async function appendInTransaction(db: DbOrTx, event: NewEvent): Promise<number> {
  const head = await chainHead(db);
  const stored: StoredEvent = {
    id: head.nextId,
    at: (event.at ?? now()).getTime(),
    actorId: event.actorId,
    station: event.station,
    type: event.type,
    subjectKind: event.subjectKind,
    subjectId: event.subjectId,
    data: JSON.stringify(event.data ?? {}),
    reason: event.reason ?? null,
    correctsId: event.correctsId ?? null,
  };
  await db.insert(events).values({
    ...stored,
    at: new Date(stored.at),
    // The exact text that was hashed, not a second serialisation by the column's mapper.
    data: sql`${stored.data}`,
    prevHash: head.prevHash,
    hash: eventHash(stored, head.prevHash),
  });
  return stored.id;
}

export interface EventRow {
  id: number;
  at: Date;
  station: string;
  type: string;
  subjectKind: string;
  subjectId: string;
  data: Record<string, unknown>;
  reason: string | null;
  correctsId: number | null;
  actorName: string | null;
  /**
   * What the subject is called now, read from its own table: an item's serial, a user's or
   * machine token's name, a model's code and name, a dealer's or finish's name, a batch's or
   * matched set's code. Null when the subject is not in any of them (or is gone).
   */
  subjectName: string | null;
  /** For an item: its kind ("pair", "carton"…), so its serial can be shown as a link. */
  subjectItemKind: string | null;
  /** Dealer codes the event's data names (a shipment's dealer), with the dealer's name. */
  dealerNames: Record<string, string>;
}

const subjectUser = alias(users, "subject_user");
const isSubject = (kind: string, id: SQLiteColumn) => and(eq(events.subjectKind, kind), eq(id, events.subjectId));

/** Who is reading the log: what they may see of it follows from their permissions (`eventScope`). */
export interface EventViewer {
  id: string;
  permissions: ReadonlySet<Permission>;
}

/** Subjects that are people's accounts and machines' keys: private to their owner and to administrators. */
const PRIVATE_SUBJECTS = ["user", "machine_token"];
/** Subjects of the register (items and what they are made from or sold through): everyone who reads the register sees their history. */
const REGISTER_SUBJECTS = ["item", "batch", "set", "model", "finish", "dealer"];

/**
 * The events this person may see. An administrator sees the whole log. Anyone else sees what
 * was recorded at the stations of the areas their roles may use (lib/areas.ts), the history of
 * the register's items if they may read the register, and their own account's events; never
 * another person's account (invitations, e-mail addresses, sign-ins) or the machine tokens.
 * Undefined: no limit.
 */
export function eventScope(viewer: EventViewer): SQL | undefined {
  if (viewer.permissions.has("admin.users")) return undefined;
  const stations = [...new Set(AREAS.filter((a) => viewer.permissions.has(a.permission)).flatMap((a) => a.stations))];
  const seen: SQL[] = [and(eq(events.subjectKind, "user"), eq(events.subjectId, viewer.id))!];
  if (stations.length) seen.push(and(inArray(events.station, stations), notInArray(events.subjectKind, PRIVATE_SUBJECTS))!);
  if (viewer.permissions.has("register.read")) seen.push(inArray(events.subjectKind, REGISTER_SUBJECTS));
  return or(...seen);
}

/**
 * The newest events this viewer may see (`eventScope`), optionally only those recorded at some
 * stations or about one subject. The viewer is required, so no page lists the log unscoped.
 */
export async function recentEvents(
  db: DbOrTx,
  opts: { viewer: EventViewer; limit?: number; stations?: string[]; subject?: { kind: string; id: string }; subjects?: { kind: string; ids: string[] } },
): Promise<EventRow[]> {
  const where: SQL[] = [];
  const scope = eventScope(opts.viewer);
  if (scope) where.push(scope);
  if (opts.stations) where.push(inArray(events.station, opts.stations));
  if (opts.subject) where.push(eq(events.subjectKind, opts.subject.kind), eq(events.subjectId, opts.subject.id));
  if (opts.subjects) where.push(eq(events.subjectKind, opts.subjects.kind), inArray(events.subjectId, opts.subjects.ids));
  const rows = await db
    .select({
      id: events.id,
      at: events.at,
      station: events.station,
      type: events.type,
      subjectKind: events.subjectKind,
      subjectId: events.subjectId,
      data: events.data,
      reason: events.reason,
      correctsId: events.correctsId,
      actorName: users.name,
      // Each subject kind has its own table; at most one of these joins finds a row.
      subjectName: sql<string | null>`coalesce(${items.identity}, ${subjectUser.name}, ${models.code} || ' ' || ${models.name}, ${finishes.name}, ${dealers.name}, ${unitBatches.code}, ${matchedSets.code}, ${machineTokens.name})`,
      subjectItemKind: items.kind,
    })
    .from(events)
    .leftJoin(users, eq(users.id, events.actorId))
    .leftJoin(items, isSubject("item", items.id))
    .leftJoin(subjectUser, isSubject("user", subjectUser.id))
    .leftJoin(models, isSubject("model", models.id))
    .leftJoin(finishes, isSubject("finish", finishes.id))
    .leftJoin(dealers, isSubject("dealer", dealers.id))
    .leftJoin(unitBatches, isSubject("batch", unitBatches.id))
    .leftJoin(matchedSets, isSubject("set", matchedSets.id))
    .leftJoin(machineTokens, isSubject("machine_token", machineTokens.id))
    .where(where.length ? and(...where) : undefined)
    .orderBy(desc(events.id))
    .limit(opts.limit ?? 50);

  // Shipping events name their dealer by code: one more query for the names of those in view.
  const codes = [...new Set(rows.map((r) => r.data?.dealer).filter((c): c is string => typeof c === "string" && c !== ""))];
  const named = codes.length ? await db.select({ code: dealers.code, name: dealers.name }).from(dealers).where(inArray(dealers.code, codes)) : [];
  const dealerName = new Map(named.map((d) => [d.code, d.name]));
  return rows.map((r) => {
    const code = typeof r.data?.dealer === "string" ? r.data.dealer : null;
    const name = code ? dealerName.get(code) : undefined;
    return { ...r, dealerNames: code && name ? { [code]: name } : {} };
  });
}
