import "server-only";
import { randomBytes } from "node:crypto";
import { desc, eq, inArray, sql, type SQL } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db";
import { mailAttempts, mailSecrets, outbox, type OutboxMessage } from "@/db/schema";

/** Tries per message before it is given up as failed. */
export const DEFAULT_MAX_ATTEMPTS = 8;
export const FIRST_RETRY_MS = 30_000;
export const MAX_RETRY_MS = 60 * 60_000;

/** The wait after the n-th failed try (n ≥ 1) before try n+1: 30 s · 2^(n−1), at most one hour. */
export function retryDelayMs(failures: number): number {
  if (!Number.isInteger(failures) || failures < 1) throw new RangeError(`failures must be a whole number ≥ 1, got ${failures}`);
  return Math.min(FIRST_RETRY_MS * 2 ** (failures - 1), MAX_RETRY_MS);
}

/** When the next try is due: null for a message never tried (due at once). */
export function nextAttemptAt(failures: number, lastFailedAt: Date | null): Date | null {
  if (failures === 0 || !lastFailedAt) return null;
  return new Date(lastFailedAt.getTime() + retryDelayMs(failures));
}

/**
 * retryDelayMs as an SQL expression, generated from the function itself so the sender's query
 * and the list agree by construction. Only numbers go into the raw text.
 */
export function retryDelaySql(failures: SQL): SQL {
  const whens: string[] = [];
  for (let n = 1; retryDelayMs(n) < MAX_RETRY_MS; n++) whens.push(`WHEN ${n} THEN ${retryDelayMs(n)}`);
  return sql`(CASE ${failures} ${sql.raw(whens.join(" "))} ELSE ${sql.raw(String(MAX_RETRY_MS))} END)`;
}

/** Per message: how many tries, how many failed, when it was sent and when it last failed. */
export function attemptStats(db: DbOrTx) {
  return db
    .select({
      outboxId: mailAttempts.outboxId,
      attempts: sql<number>`count(*)`.as("attempts"),
      failures: sql<number>`sum(CASE WHEN ${mailAttempts.ok} THEN 0 ELSE 1 END)`.as("failures"),
      sentAt: sql<number | null>`min(CASE WHEN ${mailAttempts.ok} THEN ${mailAttempts.at} END)`.as("sent_at"),
      lastFailedAt: sql<number | null>`max(CASE WHEN ${mailAttempts.ok} THEN NULL ELSE ${mailAttempts.at} END)`.as("last_failed_at"),
    })
    .from(mailAttempts)
    .groupBy(mailAttempts.outboxId)
    .as("attempt_stats");
}

const oneLine = (what: string) =>
  z
    .string()
    .trim()
    .min(1, `${what} is empty`)
    .refine((v) => !/[\r\n]/.test(v), `${what} must be one line`);

/** A file the sender makes when it sends: e.g. a certificate, rendered from the register then. */
export type MailAttachment = OutboxMessage["attachments"][number];

// A file name, never a path: the mail client saves it under this name.
const filename = oneLine("the file name").refine((v) => !/[\\/]/.test(v) && v.length <= 120, "the file name must be a plain name of at most 120 characters");

const attachment = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("certificate"), certificateId: z.string().min(1, "the certificate is not named"), filename }),
  z.object({ kind: z.literal("delivery_note"), shipmentId: z.string().min(1, "the shipment is not named"), filename }),
]);

// A secret goes back into the HTML unescaped, so only URL-safe tokens are accepted as secrets.
const secret = z.string().regex(/^[A-Za-z0-9_-]{16,}$/, "a secret must be a URL-safe token of at least 16 characters");

const newMail = z
  .object({
    to: oneLine("the recipient"),
    subject: oneLine("the subject"),
    text: z.string().min(1, "the text is empty"),
    html: z.string().nullish(),
    eventId: z.number().int().positive().nullish(),
    attachments: z.array(attachment).max(100, "at most 100 attachments").optional(),
    secrets: z.array(secret).max(10, "at most 10 secrets").optional(),
  })
  .refine((m) => (m.secrets ?? []).every((s) => m.text.includes(s)), "every secret must appear in the text");

export interface NewMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
  eventId?: number | null;
  /** Made when the message is sent, not stored: the outbox keeps what to make. */
  attachments?: MailAttachment[];
  /**
   * Parts of the text and HTML that must not stay in the database, such as a one-time link's
   * token. The outbox keeps a marker in their place; the values wait in mail_secrets until the
   * sender has delivered the message or given it up, and are deleted then.
   */
  secrets?: string[];
}

/** The placeholder a secret leaves in the stored message: random, so no other text can match it. */
export function secretMarker(): string {
  return `[[link:${randomBytes(8).toString("hex")}]]`;
}

// What secretMarker makes, and what migration 0020 put in mail queued before it.
const MARKER = /\[\[link:(?:[0-9a-f]{16}|legacy-\d+)\]\]/;

/** Takes each secret out of a text, putting its marker in every place it stood. */
export function redactSecrets(text: string, markers: Record<string, string>): string {
  let out = text;
  for (const [marker, value] of Object.entries(markers)) out = out.split(value).join(marker);
  return out;
}

/** Puts the secrets back for sending. Throws if a marker is left over: its secret is gone. */
export function restoreSecrets(text: string, markers: Record<string, string>): string {
  let out = text;
  for (const [marker, value] of Object.entries(markers)) out = out.split(marker).join(value);
  if (MARKER.test(out)) throw new Error("the message's one-time link is no longer kept; ask for a new one");
  return out;
}

/**
 * Deletes the secrets of these messages. secure_delete (on this transaction's connection) makes
 * SQLite overwrite the deleted bytes instead of leaving them in the file's free space.
 */
export async function forgetSecrets(tx: DbOrTx, outboxIds: number[]): Promise<void> {
  if (!outboxIds.length) return;
  await tx.run(sql`PRAGMA secure_delete = ON`);
  await tx.delete(mailSecrets).where(inArray(mailSecrets.outboxId, outboxIds));
}

/**
 * Queues one message and returns its outbox id. Call it with the transaction that records the
 * event causing the mail, so a rolled-back change sends nothing; the sender delivers it later.
 */
export async function queueMail(tx: DbOrTx, msg: NewMail): Promise<number> {
  const m = newMail.parse(msg);
  const markers: Record<string, string> = {};
  for (const value of new Set(m.secrets ?? [])) markers[secretMarker()] = value;
  const [row] = await tx
    .insert(outbox)
    .values({
      to: m.to,
      subject: m.subject,
      text: redactSecrets(m.text, markers),
      html: m.html == null ? null : redactSecrets(m.html, markers),
      eventId: m.eventId ?? null,
      attachments: m.attachments ?? [],
    })
    .returning({ id: outbox.id });
  if (!row) throw new Error("mail was not queued");
  if (Object.keys(markers).length) await tx.insert(mailSecrets).values({ outboxId: row.id, values: markers });
  return row.id;
}

export type OutboxStatus = "sent" | "pending" | "failed";

export interface OutboxEntry {
  id: number;
  eventId: number | null;
  to: string;
  subject: string;
  createdAt: Date;
  status: OutboxStatus;
  attempts: number;
  /** The newest failure's message; kept after a later success, as the history of the message. */
  lastError: string | null;
  sentAt: Date | null;
  /** For a pending message: when the sender will try it next (null: at its next run). */
  nextAttemptAt: Date | null;
  /** The names of the files it carries (made when it is sent). */
  attachments: string[];
}

export function deriveStatus(sent: boolean, failures: number, maxAttempts: number): OutboxStatus {
  if (sent) return "sent";
  return failures >= maxAttempts ? "failed" : "pending";
}

const toDate = (ms: number | null | undefined) => (ms === null || ms === undefined ? null : new Date(Number(ms)));

/**
 * The newest messages with their derived delivery state, in one query. The bodies are left
 * out on purpose: invite and reset mails carry sign-in links that a list must not show.
 */
export async function listOutbox(
  db: DbOrTx,
  opts: { limit?: number; maxAttempts?: number; /** Only the messages of these events. */ eventIds?: number[] } = {},
): Promise<OutboxEntry[]> {
  if (opts.eventIds && opts.eventIds.length === 0) return [];
  const maxAttempts = opts.maxAttempts ?? DEFAULT_MAX_ATTEMPTS;
  const stats = attemptStats(db);
  const rows = await db
    .select({
      id: outbox.id,
      eventId: outbox.eventId,
      to: outbox.to,
      subject: outbox.subject,
      createdAt: outbox.createdAt,
      attachments: outbox.attachments,
      attempts: stats.attempts,
      failures: stats.failures,
      sentAt: stats.sentAt,
      lastFailedAt: stats.lastFailedAt,
      lastError: sql<string | null>`(SELECT ${mailAttempts.detail} FROM ${mailAttempts}
        WHERE ${mailAttempts.outboxId} = ${outbox.id} AND NOT ${mailAttempts.ok}
        ORDER BY ${mailAttempts.id} DESC LIMIT 1)`,
    })
    .from(outbox)
    .leftJoin(stats, eq(stats.outboxId, outbox.id))
    .where(opts.eventIds ? inArray(outbox.eventId, opts.eventIds) : undefined)
    .orderBy(desc(outbox.id))
    .limit(opts.limit ?? (opts.eventIds ? opts.eventIds.length * 4 : 50));

  return rows.map((r) => {
    const failures = Number(r.failures ?? 0);
    const sentAt = toDate(r.sentAt);
    const status = deriveStatus(sentAt !== null, failures, maxAttempts);
    return {
      id: r.id,
      eventId: r.eventId,
      to: r.to,
      subject: r.subject,
      createdAt: r.createdAt,
      status,
      attempts: Number(r.attempts ?? 0),
      lastError: r.lastError ?? null,
      sentAt,
      nextAttemptAt: status === "pending" ? nextAttemptAt(failures, toDate(r.lastFailedAt)) : null,
      attachments: (r.attachments ?? []).map((a) => a.filename),
    };
  });
}
