import "server-only";
import { desc, eq, inArray } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { events, users } from "@/db/schema";

export interface NewEvent {
  actorId: string | null;
  station: string;
  type: string;
  subjectKind: string;
  subjectId: string;
  data?: Record<string, unknown>;
  reason?: string | null;
  correctsId?: number | null;
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

/** The newest events, optionally only those recorded at some stations. */
export async function recentEvents(db: DbOrTx, opts: { limit?: number; stations?: string[] } = {}): Promise<EventRow[]> {
  const q = db
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
    .orderBy(desc(events.id))
    .limit(opts.limit ?? 50);
  if (opts.stations && opts.stations.length > 0) return q.where(inArray(events.station, opts.stations));
  return q;
}
