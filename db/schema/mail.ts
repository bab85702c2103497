import { sql } from "drizzle-orm";
import { index, integer, sqliteTable, text } from "drizzle-orm/sqlite-core";
import { events } from "./events";

/**
 * Outgoing mail, queued in the same transaction as the event that causes it.
 * A message's content is never changed; each delivery try is appended to mail_attempts.
 */
export const outbox = sqliteTable(
  "outbox",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    eventId: integer("event_id").references(() => events.id),
    to: text("to").notNull(),
    subject: text("subject").notNull(),
    text: text("text").notNull(),
    html: text("html"),
    /**
     * Files to attach, made when the mail is sent: e.g. { kind: "certificate", certificateId, filename }
     * renders that certificate's PDF (marked as a copy). Nothing bulky is kept in the outbox.
     */
    attachments: text("attachments", { mode: "json" }).$type<({ kind: "certificate"; certificateId: string; filename: string } | { kind: "delivery_note"; shipmentId: string; filename: string })[]>().notNull().default([]),
    createdAt: integer("created_at", { mode: "timestamp_ms" })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
  },
  (t) => [index("outbox_created_idx").on(t.createdAt)],
);

/** One row per delivery try: ok with the server's message id, or the error. */
export const mailAttempts = sqliteTable(
  "mail_attempts",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    outboxId: integer("outbox_id")
      .notNull()
      .references(() => outbox.id),
    at: integer("at", { mode: "timestamp_ms" }).notNull(),
    ok: integer("ok", { mode: "boolean" }).notNull(),
    detail: text("detail").notNull(),
  },
  (t) => [index("mail_attempts_outbox_idx").on(t.outboxId)],
);

/**
 * The secret parts of a queued message (a one-time link's token), kept apart from the append-only
 * outbox, which holds the message with a marker in their place. The sender puts them back when it
 * sends and deletes the row once the message is delivered or given up, so no usable link stays
 * readable in the database. `values` maps each marker to what it stands for.
 */
export const mailSecrets = sqliteTable("mail_secrets", {
  outboxId: integer("outbox_id")
    .primaryKey()
    .references(() => outbox.id),
  values: text("values", { mode: "json" }).$type<Record<string, string>>().notNull(),
});

export type OutboxMessage = typeof outbox.$inferSelect;

/**
 * Who is sending a message now: a lease taken in a write transaction just before the send (only
 * while the message is still due and no live lease exists) and deleted in the transaction that
 * records the try. Every server process runs the sender; this is what makes one of them send.
 * A lease whose process died ends at `until`, and the message is tried again.
 */
export const mailClaims = sqliteTable("mail_claims", {
  outboxId: integer("outbox_id")
    .primaryKey()
    .references(() => outbox.id),
  /** A random name the sender run took for itself. */
  holder: text("holder").notNull(),
  until: integer("until", { mode: "timestamp_ms" }).notNull(),
});
