import "server-only";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";

/** An event as the database holds it, every value untouched (a number stays a number, text text). */
export interface RawEvent {
  id: number;
  at: unknown;
  actorId: unknown;
  station: unknown;
  type: unknown;
  subjectKind: unknown;
  subjectId: unknown;
  data: unknown;
  reason: unknown;
  correctsId: unknown;
  prevHash: unknown;
  hash: unknown;
}

const PAGE = 2000;

/** Every event in id order, a page at a time, so a long log never sits in memory whole. */
export async function* readEvents(db: DbOrTx, fromId = 0): AsyncGenerator<RawEvent[]> {
  let after = fromId;
  for (;;) {
    const page = await db.all<RawEvent>(sql`
      SELECT id, at, actor_id AS actorId, station, type, subject_kind AS subjectKind, subject_id AS subjectId,
             data, reason, corrects_id AS correctsId, prev_hash AS prevHash, hash
      FROM events WHERE id > ${after} ORDER BY id LIMIT ${PAGE}`);
    if (page.length === 0) return;
    yield page;
    after = Number(page[page.length - 1]!.id);
    if (page.length < PAGE) return;
  }
}
