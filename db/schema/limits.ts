import { sql } from "drizzle-orm";
import { check, index, integer, sqliteTable, text } from "drizzle-orm/sqlite-core";

/**
 * The states of a counted try (lib/limits): `pending` is reserved and not yet settled, `counted`
 * counts against its limit (a failure, or a plain hit), `success` does not count. A pending try
 * counts like a failure, so tries sent at once cannot all slip past the check before any is settled,
 * and a try whose process died before settling still counts until it leaves the window.
 */
export const LIMIT_STATES = ["pending", "counted", "success"] as const;
export type LimitState = (typeof LIMIT_STATES)[number];

/**
 * Every try that a limit counts (sign-in, reset requests, the public certificate check), kept in
 * the database so that every server process sees the same counts. One try may count under several
 * keys at once (an account and a client address): its rows share `attempt`. Rows older than a day
 * are deleted (lib/limits); nothing else reads them.
 */
export const limitHits = sqliteTable(
  "limit_hits",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    attempt: text("attempt").notNull(),
    /** The limit and what it counts, e.g. "sign-in:account:ann@workshop.test" or "verify:address:192.0.2.7". */
    key: text("key").notNull(),
    state: text("state", { enum: LIMIT_STATES }).notNull(),
    at: integer("at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [
    index("limit_hits_key_idx").on(t.key, t.at),
    index("limit_hits_attempt_idx").on(t.attempt),
    index("limit_hits_at_idx").on(t.at),
    check("limit_hits_state_check", sql`${t.state} IN ('pending', 'counted', 'success')`),
  ],
);
