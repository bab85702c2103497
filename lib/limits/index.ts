import "server-only";
import { randomUUID } from "node:crypto";
import { and, desc, eq, gt, inArray, lt } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db";
import { limitHits } from "@/db/schema";
import { waitMs, type WindowPolicy } from "./window";

export { waitMs, type WindowPolicy } from "./window";

/**
 * Limits kept in the database, so that every server process (and every pooled connection) sees the
 * same counts. A try is reserved before the work it guards is done: counting the recent tries,
 * refusing when over, and recording this one happen in one write transaction. libSQL opens
 * `db.transaction` as a write transaction (BEGIN IMMEDIATE), so no other connection can count
 * between this one's count and its insert, and tries sent at once are counted one after another.
 */
export interface Limit extends WindowPolicy {
  /** What is counted, e.g. "sign-in:account:ann@workshop.test". */
  key: string;
  /** Count only tries after this key's last success (an account's failures since it last signed in). */
  sinceSuccess?: boolean;
}

export type Reservation = { ok: true; attempt: string } | { ok: false; retryAfterMs: number };

/** Rows older than this are deleted; no limit looks further back. */
export const KEEP_MS = 24 * 60 * 60_000;

/**
 * Reserves one try under every limit at once, or none: refused when any limit is full. A `pending`
 * try counts until it is settled (a try whose process died still counts until it leaves the
 * window); a `counted` try is a plain hit that needs no settling.
 */
export async function reserve(db: Db, limits: readonly Limit[], opts: { now?: Date; state?: "pending" | "counted" } = {}): Promise<Reservation> {
  const now = opts.now ?? new Date();
  const state = opts.state ?? "pending";
  for (const l of limits) if (l.windowMs > KEEP_MS) throw new Error(`A limit's window is longer than the rows are kept: ${l.key}`);
  return db.transaction(async (tx) => {
    let wait = 0;
    for (const limit of limits) {
      let from = new Date(now.getTime() - limit.windowMs);
      if (limit.sinceSuccess) {
        const [last] = await tx
          .select({ at: limitHits.at })
          .from(limitHits)
          .where(and(eq(limitHits.key, limit.key), eq(limitHits.state, "success")))
          .orderBy(desc(limitHits.at))
          .limit(1);
        if (last && last.at >= from) from = last.at;
      }
      const rows = await tx
        .select({ at: limitHits.at })
        .from(limitHits)
        .where(and(eq(limitHits.key, limit.key), inArray(limitHits.state, ["pending", "counted"]), gt(limitHits.at, from)));
      wait = Math.max(wait, waitMs(rows.map((r) => r.at.getTime()), limit, now.getTime()));
    }
    if (wait > 0) return { ok: false as const, retryAfterMs: wait };
    const attempt = randomUUID();
    await tx.insert(limitHits).values(limits.map((l) => ({ attempt, key: l.key, state, at: now })));
    // Old rows go as new ones come, so the table stays small without a scheduled job.
    await tx.delete(limitHits).where(lt(limitHits.at, new Date(now.getTime() - KEEP_MS)));
    return { ok: true as const, attempt };
  });
}

/** Settles a reserved try: `counted` (a failure) keeps counting, `success` stops counting. */
export async function settle(db: DbOrTx, attempt: string, outcome: "counted" | "success"): Promise<void> {
  await db.update(limitHits).set({ state: outcome }).where(and(eq(limitHits.attempt, attempt), eq(limitHits.state, "pending")));
}

/** Deletes rows no limit reads any more; `reserve` does this as it goes. */
export async function cleanUp(db: Db, now: Date = new Date()): Promise<number> {
  return db.transaction(async (tx) => {
    const gone = await tx.delete(limitHits).where(lt(limitHits.at, new Date(now.getTime() - KEEP_MS))).returning({ id: limitHits.id });
    return gone.length;
  });
}
