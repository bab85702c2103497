import "server-only";
import { and, desc, eq, inArray, type SQL } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { events, users } from "@/db/schema";
import { now } from "@/lib/clock";
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

/** Appends one event and returns its id. Call it inside the transaction that makes the change. */
export async function appendEvent(db: DbOrTx, event: NewEvent): Promise<number> {
  const [row] = await db
    .insert(events)
    .values({
      actorId: event.actorId,
      station: event.station,
      type: event.type,
      subjectKind: event.subjectKind,
      subjectId: event.subjectId,
      data: event.data ?? {},
      reason: event.reason ?? null,
      correctsId: event.correctsId ?? null,
      at: event.at ?? now(),
    })
    .returning({ id: events.id });
  if (!row) throw new Error("event was not written");
  return row.id;
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
}

/** The newest events, optionally only those recorded at some stations or about one subject. */
export async function recentEvents(
  db: DbOrTx,
  opts: { limit?: number; stations?: string[]; subject?: { kind: string; id: string }; subjects?: { kind: string; ids: string[] } } = {},
): Promise<EventRow[]> {
  const where: SQL[] = [];
  if (opts.stations) where.push(inArray(events.station, opts.stations));
  if (opts.subject) where.push(eq(events.subjectKind, opts.subject.kind), eq(events.subjectId, opts.subject.id));
  if (opts.subjects) where.push(eq(events.subjectKind, opts.subjects.kind), inArray(events.subjectId, opts.subjects.ids));
  return db
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
    })
    .from(events)
    .leftJoin(users, eq(users.id, events.actorId))
    .where(where.length ? and(...where) : undefined)
    .orderBy(desc(events.id))
    .limit(opts.limit ?? 50);
}
