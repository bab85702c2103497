/**
 * What the payment provider tells Twinleaf, through its signed webhook: a checkout paid, a charge
 * refunded. Each is recorded once however often it is delivered (unique provider event id, session
 * and refund ids in the schema), and "who" is the provider (no actor), "where" the service desk.
 */
import "server-only";
import { eq, or } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { paymentRequests, payments, refunds, serviceCases, type Payment } from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { moveCase, SERVICE_STATION } from "@/lib/service/states";
import { provider, providerClient, readProviderConfig, type Stripe } from "./provider";
import { recordRefund, refundPayment } from "./refunds";

/** How old a signed delivery may be, in seconds: the SDK's own default (a replay after that is refused). */
export const SIGNATURE_TOLERANCE_S = 300;

export const BAD_SIGNATURE = "The signature of this webhook is missing, wrong or too old. Nothing was recorded.";

/**
 * The event in a webhook body, if its `Stripe-Signature` header signs these exact bytes with the
 * webhook secret within the tolerance; otherwise a 400 AppError. Checked by the provider's SDK.
 */
export function verifyWebhook(raw: string, signature: string | null, env: Record<string, string | undefined> = process.env): Stripe.Event {
  if (!signature) throw new AppError(400, BAD_SIGNATURE);
  const config = readProviderConfig(env);
  if (!config?.webhookSecret) throw new AppError(503, "Payments are not set up on this server (STRIPE_WEBHOOK_SECRET is missing). Nothing was recorded.");
  try {
    return providerClient(config).webhooks.constructEvent(raw, signature, config.webhookSecret, SIGNATURE_TOLERANCE_S);
  } catch {
    throw new AppError(400, BAD_SIGNATURE);
  }
}

export type WebhookOutcome =
  | { outcome: "recorded"; paymentId: number }
  | { outcome: "refunded"; paymentId: number }
  | { outcome: "already recorded" }
  | { outcome: "ignored"; why: string };

const NO_ACTOR = { id: null } as const;

/** Acts on one verified provider event. */
export async function handleProviderEvent(db: DbOrTx, event: Stripe.Event, client?: Stripe): Promise<WebhookOutcome> {
  if (event.type === "checkout.session.completed") return sessionCompleted(db, event.id, event.data.object, client);
  if (event.type === "charge.refunded") return chargeRefunded(db, event.data.object);
  return { outcome: "ignored", why: `Twinleaf does not act on ${event.type}.` };
}

async function sessionCompleted(db: DbOrTx, eventId: string, session: Stripe.Checkout.Session, client?: Stripe): Promise<WebhookOutcome> {
  if (session.payment_status !== "paid") return { outcome: "ignored", why: "the session is not paid" };
  const [request] = await db.select().from(paymentRequests).where(eq(paymentRequests.sessionId, session.id));
  if (!request) return { outcome: "ignored", why: "no payment link of Twinleaf's has this session" };
  const intent = typeof session.payment_intent === "string" ? session.payment_intent : session.payment_intent?.id;
  if (!intent) return { outcome: "ignored", why: "the session names no payment" };
  if (session.amount_total !== request.amountMinor || session.currency?.toUpperCase() !== request.currency) {
    console.error(`payment webhook: session ${session.id} paid ${session.amount_total} ${session.currency}, the link asked ${request.amountMinor} ${request.currency}`);
    return { outcome: "ignored", why: "the amount paid is not the amount asked" };
  }

  let recorded: Payment | null;
  try {
    recorded = await db.transaction(async (tx) => {
      const [seen] = await tx
        .select({ id: payments.id })
        .from(payments)
        .where(or(eq(payments.providerEventId, eventId), eq(payments.sessionId, session.id), eq(payments.paymentIntentId, intent)));
      if (seen) return null;
      const [c] = await tx.select().from(serviceCases).where(eq(serviceCases.id, request.caseId));
      if (!c) throw new AppError(404, "No such service case.");
      const eventRow = await appendEvent(tx, {
        actorId: null,
        station: SERVICE_STATION,
        type: "payment.received",
        subjectKind: "case",
        subjectId: c.id,
        data: { code: c.code, quoteId: request.quoteId, sessionId: session.id, amountMinor: request.amountMinor, currency: request.currency, ...(c.state === "cancelled" ? { refundDue: true } : {}) },
      });
      const [payment] = await tx
        .insert(payments)
        .values({
          caseId: c.id,
          quoteId: request.quoteId,
          sessionId: session.id,
          paymentIntentId: intent,
          providerEventId: eventId,
          amountMinor: request.amountMinor,
          currency: request.currency,
          eventId: eventRow,
          createdAt: now(),
        })
        .returning();
      // Paid: ready to repair. A case the desk already moved on stays where it is.
      if (c.state === "waiting_payment") await moveCase(tx, { caseId: c.id, from: "waiting_payment", to: "diagnosed", data: { paid: true } }, NO_ACTOR);
      return payment!;
    });
  } catch (e) {
    // The same delivery at the same moment on another connection: the schema let one through.
    if (!isConstraintError(e, "UNIQUE")) throw e;
    recorded = null;
  }
  // A payment for a cancelled case is given back, not taken. Checked on every delivery, so one
  // whose refund failed (the provider then delivers again) is refunded on the next.
  const [payment] = recorded ? [recorded] : await db.select().from(payments).where(eq(payments.sessionId, session.id));
  const [c] = await db.select({ state: serviceCases.state }).from(serviceCases).where(eq(serviceCases.id, request.caseId));
  if (payment && c?.state === "cancelled") {
    const [refunded] = await db.select({ id: refunds.id }).from(refunds).where(eq(refunds.paymentId, payment.id));
    if (!refunded) {
      await refundPayment(db, payment, "The case was cancelled before the payment arrived.", NO_ACTOR, client ?? provider());
      return { outcome: "refunded", paymentId: payment.id };
    }
  }
  return recorded ? { outcome: "recorded", paymentId: recorded.id } : { outcome: "already recorded" };
}

/** A refund the provider reports (one Twinleaf asked for, or one made at the provider): recorded once. */
async function chargeRefunded(db: DbOrTx, charge: Stripe.Charge): Promise<WebhookOutcome> {
  const intent = typeof charge.payment_intent === "string" ? charge.payment_intent : charge.payment_intent?.id;
  if (!intent) return { outcome: "ignored", why: "the charge names no payment" };
  const [payment] = await db.select().from(payments).where(eq(payments.paymentIntentId, intent));
  if (!payment) return { outcome: "ignored", why: "no payment of Twinleaf's has this charge" };
  const [done] = await db.select({ id: refunds.id }).from(refunds).where(eq(refunds.paymentId, payment.id));
  if (done) return { outcome: "already recorded" };
  const refund = charge.refunds?.data?.[0];
  if (!refund || !charge.refunded) return { outcome: "ignored", why: "only a whole refund is recorded" };
  const saved = await recordRefund(db, payment, { id: refund.id, amount: refund.amount }, "Refunded at the payment service.", NO_ACTOR);
  return saved ? { outcome: "refunded", paymentId: payment.id } : { outcome: "already recorded" };
}
