import "server-only";
import { randomUUID } from "node:crypto";
import { and, eq, gte, isNotNull, isNull, lt, notExists, or, sql } from "drizzle-orm";
import { getDb, type Db } from "@/db";
import { certificates, items, mailAttempts, mailClaims, mailSecrets, outbox, type OutboxMessage } from "@/db/schema";
import { attemptStats, DEFAULT_MAX_ATTEMPTS, forgetSecrets, nextAttemptAt, restoreSecrets, retryDelaySql } from "./outbox";
import { createMailTransport, type MailTransport } from "./transport";

export interface DeliverOptions {
  /** The clock, for tests and for replaying a schedule; attempts are stamped with it. */
  now?: Date;
  maxAttempts?: number;
  /** At most this many messages per run, oldest first. */
  batch?: number;
  /** Sender address; by default the transport's own (createMailTransport sets MAIL_FROM). */
  from?: string;
  /** Where the links printed in attached certificates point: by default APP_URL. */
  baseUrl?: string;
}

const defaultBaseUrl = () => (process.env.APP_URL || "http://localhost:3000").replace(/\/$/, "");

/**
 * The files a message names, made now: each certificate is rendered from the register as a copy,
 * a shipment's delivery note from the shipment as it stands.
 * Loaded only when a message has attachments, so plain mail never pulls in the PDF renderer.
 * A failure here fails the try, and the message is tried again later like any other.
 */
async function attachmentsFor(db: Db, list: OutboxMessage["attachments"], baseUrl: string) {
  if (!list?.length) return [];
  const { certificateData, renderCertificate } = await import("@/lib/certificates");
  const out: { filename: string; content: Buffer; contentType: string }[] = [];
  for (const a of list) {
    if (a.kind === "delivery_note") {
      const { deliveryNotePdf } = await import("@/lib/dispatch/delivery-note");
      const [row] = await db.select({ identity: items.identity }).from(items).where(eq(items.id, a.shipmentId)).limit(1);
      if (!row) throw new Error(`attachment ${a.filename}: no shipment ${a.shipmentId}`);
      out.push({ filename: a.filename, content: await deliveryNotePdf(db, row.identity, { baseUrl }), contentType: "application/pdf" });
      continue;
    }
    if (a.kind !== "certificate") throw new Error(`attachment: unknown kind ${String((a as { kind: unknown }).kind)}`);
    const [row] = await db.select({ pairId: certificates.pairId }).from(certificates).where(eq(certificates.id, a.certificateId)).limit(1);
    if (!row) throw new Error(`attachment ${a.filename}: no certificate ${a.certificateId}`);
    const content = await renderCertificate(await certificateData(db, row.pairId, { baseUrl, copy: true }));
    out.push({ filename: a.filename, content, contentType: "application/pdf" });
  }
  return out;
}

/**
 * How long a claim on a message lasts. Longer than one send can take (nodemailer gives up on a
 * silent server after its 10-minute socket timeout), so a live sender never loses its claim; a
 * claim left by a process that died ends after this, and the message is sent then.
 */
export const CLAIM_MS = 15 * 60_000;

/**
 * Claims one message for this run, or returns false: taken in one write transaction with a fresh
 * look at its tries, so of two processes that both read it as due, one claims it and the other
 * finds it claimed, or (once the first has recorded its try and let go) no longer due.
 */
async function claim(db: Db, id: number, holder: string, now: Date, maxAttempts: number): Promise<{ failures: number } | null> {
  return db.transaction(async (tx) => {
    const tries = await tx.select({ ok: mailAttempts.ok, at: mailAttempts.at }).from(mailAttempts).where(eq(mailAttempts.outboxId, id));
    if (tries.some((t) => t.ok)) return null;
    const failures = tries.length;
    if (failures >= maxAttempts) return null;
    const next = nextAttemptAt(failures, failures ? new Date(Math.max(...tries.map((t) => t.at.getTime()))) : null);
    if (next && next > now) return null;
    const until = new Date(now.getTime() + CLAIM_MS);
    const taken = await tx
      .insert(mailClaims)
      .values({ outboxId: id, holder, until })
      .onConflictDoUpdate({
        target: mailClaims.outboxId,
        set: { holder, until },
        setWhere: lt(mailClaims.until, now),
      })
      .returning({ holder: mailClaims.holder });
    return taken.length === 1 ? { failures } : null;
  });
}

const DETAIL_MAX = 500;

// What the attempt row keeps of a failure: one line, bounded. nodemailer's messages carry the
// server's reply and a code, never the credentials.
function describeFailure(e: unknown): string {
  const message = e instanceof Error ? e.message : String(e);
  const code = (e as { code?: unknown } | null)?.code;
  const text = typeof code === "string" && !message.includes(code) ? `${code}: ${message}` : message;
  return text.replace(/\s+/g, " ").trim().slice(0, DETAIL_MAX) || "unknown error";
}

/**
 * Sends every message that has no successful try, has tries left and whose backoff has passed.
 * Each try appends one mail_attempts row. No transaction is held while talking to the server:
 * the due list is read first, each message is claimed (mail_claims) just before its send, and
 * each result is written, and the claim let go, after its send returns. Any number of processes
 * may run this at once and each message is sent by one of them. Delivery is still at-least-once:
 * if writing the ok row fails, or the process dies mid-send, the message is sent again later.
 *
 * A message's secrets (its one-time link) are put back only in what goes to the server, and are
 * deleted in the same transaction as the attempt that delivers the message or gives it up. Any
 * left behind by a message already settled (sent, or out of tries) are deleted first.
 */
export async function deliverDue(
  db: Db,
  transport: MailTransport,
  opts: DeliverOptions = {},
): Promise<{ sent: number; failed: number }> {
  const maxAttempts = opts.maxAttempts ?? DEFAULT_MAX_ATTEMPTS;
  const now = opts.now ?? new Date();
  const stats = attemptStats(db);
  const failures = sql<number>`coalesce(${stats.failures}, 0)`;

  const settled = await db
    .select({ id: mailSecrets.outboxId })
    .from(mailSecrets)
    .innerJoin(stats, eq(stats.outboxId, mailSecrets.outboxId))
    .where(or(isNotNull(stats.sentAt), sql`${stats.failures} >= ${maxAttempts}`));
  if (settled.length) await db.transaction((tx) => forgetSecrets(tx, settled.map((r) => r.id)));

  const due = await db
    .select({
      id: outbox.id,
      to: outbox.to,
      subject: outbox.subject,
      text: outbox.text,
      html: outbox.html,
      attachments: outbox.attachments,
      secrets: mailSecrets.values,
    })
    .from(outbox)
    .leftJoin(stats, eq(stats.outboxId, outbox.id))
    .leftJoin(mailSecrets, eq(mailSecrets.outboxId, outbox.id))
    .where(
      and(
        isNull(stats.sentAt),
        sql`${failures} < ${maxAttempts}`,
        or(isNull(stats.lastFailedAt), sql`${stats.lastFailedAt} + ${retryDelaySql(failures)} <= ${now.getTime()}`),
        // Being sent by another process now: skipped without a write.
        notExists(db.select({ one: sql`1` }).from(mailClaims).where(and(eq(mailClaims.outboxId, outbox.id), gte(mailClaims.until, now)))),
      ),
    )
    .orderBy(outbox.id)
    .limit(opts.batch ?? 50);

  const holder = randomUUID();
  let sent = 0;
  let failed = 0;
  for (const m of due) {
    // The tries as they stand now: another process may have tried it since the list was read.
    const claimed = await claim(db, m.id, holder, now, maxAttempts);
    if (!claimed) continue;
    let ok: boolean;
    let detail: string;
    try {
      const text = restoreSecrets(m.text, m.secrets ?? {});
      const html = m.html ? restoreSecrets(m.html, m.secrets ?? {}) : null;
      const attachments = await attachmentsFor(db, m.attachments, opts.baseUrl ?? defaultBaseUrl());
      const info = await transport.sendMail({
        ...(opts.from ? { from: opts.from } : {}),
        to: m.to,
        subject: m.subject,
        text,
        ...(html ? { html } : {}),
        ...(attachments.length ? { attachments } : {}),
      });
      ok = true;
      detail = info.messageId || "accepted";
    } catch (e) {
      ok = false;
      detail = describeFailure(e);
    }
    const attempt = { outboxId: m.id, at: opts.now ?? new Date(), ok, detail };
    const settles = ok || claimed.failures + 1 >= maxAttempts;
    await db.transaction(async (tx) => {
      await tx.insert(mailAttempts).values(attempt);
      if (m.secrets && settles) await forgetSecrets(tx, [m.id]);
      await tx.delete(mailClaims).where(and(eq(mailClaims.outboxId, m.id), eq(mailClaims.holder, holder)));
    });
    if (ok) sent++;
    else failed++;
  }
  return { sent, failed };
}

type StopSender = () => Promise<void>;
// Kept on globalThis so a second call (or a hot reload) in the same process starts no second timer.
const globalForSender = globalThis as unknown as { twinleafMailSender?: { stop: StopSender } };

const messageOf = (e: unknown) => (e instanceof Error ? e.message : String(e));

/**
 * Runs deliverDue every intervalMs against the app's database and the configured SMTP server.
 * The next run is scheduled only when the previous one has finished, so runs never overlap.
 * Errors are logged and the timer keeps going. Returns a function that stops it and waits for
 * a run in progress. Throws at once if the mail settings are not valid.
 */
export function startMailSender(opts: { intervalMs?: number } = {}): StopSender {
  const existing = globalForSender.twinleafMailSender;
  if (existing) return existing.stop;

  const intervalMs = opts.intervalMs ?? 5000;
  const transport = createMailTransport();
  let stopped = false;
  let timer: NodeJS.Timeout | undefined;
  let running: Promise<void> | undefined;

  const run = async () => {
    try {
      const { failed } = await deliverDue(getDb(), transport);
      if (failed > 0) console.error(`mail sender: ${failed} message(s) could not be sent; they will be tried again`);
    } catch (e) {
      // The message only: a logged error object could carry the transport's options.
      console.error(`mail sender: run failed: ${messageOf(e)}`);
    }
  };

  const schedule = (delay: number) => {
    if (stopped) return;
    timer = setTimeout(() => {
      running = run().finally(() => {
        running = undefined;
        schedule(intervalMs);
      });
    }, delay);
    // The sender alone should not keep a script's process alive.
    timer.unref();
  };

  const stop: StopSender = async () => {
    stopped = true;
    if (timer) clearTimeout(timer);
    if (globalForSender.twinleafMailSender?.stop === stop) delete globalForSender.twinleafMailSender;
    await running;
    transport.close();
  };

  globalForSender.twinleafMailSender = { stop };
  schedule(0);
  return stop;
}
