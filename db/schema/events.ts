import { sql } from "drizzle-orm";
import { type AnySQLiteColumn, check, index, integer, sqliteTable, text } from "drizzle-orm/sqlite-core";
import { users } from "./auth";

/**
 * The event log: every step, reading, link, hold, deviation, correction and notice.
 * Rows are only ever appended; triggers in the migrations reject UPDATE, DELETE and REPLACE, and
 * each event is chained to the one before it by a hash, so a change behind the app's back shows.
 */
export const events = sqliteTable(
  "events",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    /** Server time in ms, set by the database, never by the client. */
    at: integer("at", { mode: "timestamp_ms" })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
    /** Who: null only for the system itself (seed, sender). */
    actorId: text("actor_id").references(() => users.id),
    /** Where: the station or area the event was recorded at. */
    station: text("station").notNull(),
    /** What: a dotted type such as "user.invited". */
    type: text("type").notNull(),
    /** The thing the event is about, e.g. subject_kind "user", subject_id the user's id. */
    subjectKind: text("subject_kind").notNull(),
    subjectId: text("subject_id").notNull(),
    /** Details as JSON. */
    data: text("data", { mode: "json" }).$type<Record<string, unknown>>().notNull().default({}),
    /** Why: free text, required for corrections. */
    reason: text("reason"),
    /** For a correction: the event it corrects. */
    correctsId: integer("corrects_id").references((): AnySQLiteColumn => events.id),
    /**
     * The audit chain (lib/audit/chain.ts): the previous event's hash (64 zeros before the first),
     * and SHA-256 over this event's every column and that previous hash. Set by `appendEvent`
     * inside the appending transaction; a trigger refuses an event that does not extend the head.
     */
    prevHash: text("prev_hash"),
    hash: text("hash"),
  },
  (t) => [
    index("events_subject_idx").on(t.subjectKind, t.subjectId, t.at),
    index("events_at_idx").on(t.at),
    check("events_correction_has_reason", sql`${t.correctsId} IS NULL OR length(trim(coalesce(${t.reason}, ''))) > 0`),
  ],
);

export type Event = typeof events.$inferSelect;
