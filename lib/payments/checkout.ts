/** Sending the owner a payment link: a checkout session at the provider for the case's quote. */
import "server-only";
import { desc, eq, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { items, owners, paymentRequests, quotes, serviceCases, type PaymentRequest } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { queueMail } from "@/lib/mail/outbox";
import { ownerMailData } from "@/lib/service/messages";
import { moveCase, SERVICE_STATION } from "@/lib/service/states";
import type { Actor } from "@/lib/vocabulary/actor";
import { CASE_STATE_WORDS } from "@/lib/vocabulary/case-states";
import { paymentLinkMail } from "./mail";
import { currencyOf, formatMoney } from "./money";
import { provider, providerFailure, type Stripe } from "./provider";
import { currentQuote, PAYABLE_STATES } from "./quotes";

/** Where the owner lands after paying or turning back (public, writes nothing). */
export function returnUrls(appUrl: string, caseCode: string) {
  const base = `${appUrl.replace(/\/$/, "")}/api/v1/payments/done?case=${encodeURIComponent(caseCode)}`;
  return { success: `${base}&result=paid`, cancel: `${base}&result=not-paid` };
}

/** The payment already recorded for a case and not refunded, if any. */
export async function paidFor(db: DbOrTx, caseId: string) {
  const rows = await db.all<{ id: number; amount_minor: number; currency: string }>(sql`
    SELECT p.id, p.amount_minor, p.currency FROM payments p
    WHERE p.case_id = ${caseId} AND NOT EXISTS (SELECT 1 FROM refunds r WHERE r.payment_id = p.id)`);
  return rows[0] ?? null;
}

/**
 * Opens a checkout session for the case's current quote and sends its link to the owner: a
 * "payment.requested" event, the case to "waiting for payment" (moveCase), and the message through
 * the outbox, in one transaction. The session is made first, outside it (never await the network
 * inside a write transaction); if the transaction is then refused, the unused session simply
 * expires at the provider.
 */
export async function requestPayment(
  db: DbOrTx,
  input: { caseId: string; appUrl: string },
  actor: Actor,
  client: Stripe = provider(),
): Promise<PaymentRequest> {
  const [c] = await db.select().from(serviceCases).where(eq(serviceCases.id, input.caseId));
  if (!c) throw new AppError(404, "No such service case.");
  if (!PAYABLE_STATES.includes(c.state)) throw new AppError(409, c.state === "received" ? "Diagnose the case first: the owner is told what was found, with the quote, before a link to pay is sent. Nothing was sent." : `A case that is “${CASE_STATE_WORDS[c.state]}” is not waiting to be paid for. Nothing was sent.`);
  const quote = await currentQuote(db, c.id);
  if (!quote) throw new AppError(409, "Make a quote first: the link asks the owner to pay it. Nothing was sent.");
  if (await paidFor(db, c.id)) throw new AppError(409, "This case is already paid. Nothing was sent.");
  const [owner] = c.ownerId ? await db.select().from(owners).where(eq(owners.id, c.ownerId)) : [];
  if (!owner?.email) throw new AppError(409, "The owner has no e-mail address on record, so the link cannot reach them. Add one to the case's owner first. Nothing was sent.");
  const currency = currencyOf(quote.currency);
  if (!currency) throw new AppError(500, `The quote's currency ${quote.currency} is not known.`);
  const [serial] = await db.select({ identity: items.identity }).from(items).where(eq(items.id, c.itemId));

  const urls = returnUrls(input.appUrl, c.code);
  let session: Stripe.Checkout.Session;
  try {
    session = await client.checkout.sessions.create({
      mode: "payment",
      line_items: quote.lines.map((l) => ({
        quantity: l.quantity,
        price_data: { currency: quote.currency.toLowerCase(), unit_amount: l.unitMinor, product_data: { name: l.description } },
      })),
      customer_email: owner.email,
      client_reference_id: c.code,
      metadata: { caseId: c.id, caseCode: c.code, quoteId: quote.id },
      payment_intent_data: { metadata: { caseId: c.id, caseCode: c.code, quoteId: quote.id } },
      success_url: urls.success,
      cancel_url: urls.cancel,
    });
  } catch (e) {
    throw providerFailure(e, "opening the payment page");
  }
  if (!session.url || session.amount_total !== quote.totalMinor || session.currency?.toUpperCase() !== quote.currency) {
    throw providerFailure(new Error(`session ${session.id}: url ${session.url}, ${session.amount_total} ${session.currency} for a quote of ${quote.totalMinor} ${quote.currency}`), "opening the payment page");
  }
  const link = session.url;

  const work = async (tx: DbOrTx) => {
    const [still] = await tx.select().from(serviceCases).where(eq(serviceCases.id, c.id));
    if (!still || !PAYABLE_STATES.includes(still.state)) throw new AppError(409, "The case moved meanwhile. Nothing was sent.");
    const [newest] = await tx.select({ id: quotes.id }).from(quotes).where(eq(quotes.caseId, c.id)).orderBy(desc(quotes.createdAt), desc(sql`rowid`)).limit(1);
    if (newest?.id !== quote.id) throw new AppError(409, "A newer quote was made meanwhile. Send the link again. Nothing was sent.");
    if (await paidFor(tx, c.id)) throw new AppError(409, "This case is already paid. Nothing was sent.");
    const eventId = await appendEvent(tx, {
      actorId: actor.id,
      station: SERVICE_STATION,
      type: "payment.requested",
      subjectKind: "case",
      subjectId: c.id,
      // The link answers the owner's own request for a repair, so it goes whether or not they
      // agreed to other mail; the case lists it with the owner's messages.
      data: { code: c.code, quoteId: quote.id, sessionId: session.id, amountMinor: quote.totalMinor, currency: quote.currency, to: owner.email, ...ownerMailData("payment_link", "queued") },
    });
    const [row] = await tx
      .insert(paymentRequests)
      .values({ caseId: c.id, quoteId: quote.id, sessionId: session.id, amountMinor: quote.totalMinor, currency: quote.currency, eventId, createdAt: now() })
      .returning();
    if (still.state !== "waiting_payment") await moveCase(tx, { caseId: c.id, from: still.state, to: "waiting_payment", data: { quoteId: quote.id } }, actor);
    const mail = paymentLinkMail({
      ownerName: owner.name,
      caseCode: c.code,
      serial: serial?.identity ?? c.code,
      lines: quote.lines.map((l) => ({ description: l.description, quantity: l.quantity, amount: formatMoney(l.quantity * l.unitMinor, currency) })),
      total: formatMoney(quote.totalMinor, currency),
      link,
    });
    await queueMail(tx, { to: owner.email!, subject: mail.subject, text: mail.text, html: mail.html, eventId });
    return row!;
  };
  return "rollback" in db ? work(db) : db.transaction(work);
}

/** The case's payment links, payments and refunds, newest first, for the case and quote pages. */
export async function paymentHistory(db: DbOrTx, caseId: string) {
  const requests = await db.select().from(paymentRequests).where(eq(paymentRequests.caseId, caseId)).orderBy(desc(paymentRequests.createdAt));
  const paid = await db.all<{ id: number; amount_minor: number; currency: string; created_at: number; refunded_at: number | null; refund_amount: number | null }>(sql`
    SELECT p.id, p.amount_minor, p.currency, p.created_at, r.created_at AS refunded_at, r.amount_minor AS refund_amount
    FROM payments p LEFT JOIN refunds r ON r.payment_id = p.id
    WHERE p.case_id = ${caseId} ORDER BY p.created_at DESC`);
  return {
    requests: requests.map((r) => ({ at: r.createdAt, amountMinor: r.amountMinor, currency: r.currency })),
    payments: paid.map((p) => ({
      at: new Date(Number(p.created_at)),
      amountMinor: Number(p.amount_minor),
      currency: p.currency,
      refundedAt: p.refunded_at === null ? null : new Date(Number(p.refunded_at)),
      refundMinor: p.refund_amount === null ? null : Number(p.refund_amount),
    })),
  };
}
