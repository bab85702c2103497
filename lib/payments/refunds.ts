/** Refunds: a cancelled case's payment goes back to the owner through the provider's SDK, once. */
import "server-only";
import { eq, or, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { payments, refunds, serviceCases, type Payment } from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { SERVICE_STATION } from "@/lib/service/states";
import type { Actor } from "@/lib/vocabulary/actor";
import { provider, providerFailure, type Stripe } from "./provider";

/**
 * Refunds the whole payment at the provider and records it. The idempotency key is the payment's
 * own id, so two tries (a double click, the webhook and the desk at once) make one refund there,
 * and the schema keeps one here.
 */
export async function refundPayment(db: DbOrTx, payment: Payment, reason: string, actor: Actor | { id: null }, client: Stripe = provider()) {
  let refund: Stripe.Refund;
  try {
    refund = await client.refunds.create(
      { payment_intent: payment.paymentIntentId, reason: "requested_by_customer", metadata: { caseId: payment.caseId, paymentId: String(payment.id) } },
      { idempotencyKey: `twinleaf-refund-${payment.id}` },
    );
  } catch (e) {
    throw providerFailure(e, "refunding the payment");
  }
  await recordRefund(db, payment, { id: refund.id, amount: refund.amount }, reason, actor);
  return refund;
}

/**
 * For the cancel move (the lead wires it there): a cancelled case's payment, if any and not yet
 * refunded, is refunded and "payment.refunded" appended. Returns the refund, or null when there was
 * nothing to give back. Call it after the cancel's transaction has committed, never inside it.
 */
export async function refundForCancelledCase(db: DbOrTx, caseId: string, actor: Actor | { id: null }, client?: Stripe): Promise<Stripe.Refund | null> {
  const [c] = await db.select({ state: serviceCases.state }).from(serviceCases).where(eq(serviceCases.id, caseId));
  if (!c) throw new AppError(404, "No such service case.");
  if (c.state !== "cancelled") throw new AppError(409, "Only a cancelled case's payment is refunded. Nothing was refunded.");
  const open = await db
    .select()
    .from(payments)
    .where(sql`${payments.caseId} = ${caseId} AND NOT EXISTS (SELECT 1 FROM refunds r WHERE r.payment_id = ${payments.id})`);
  let last: Stripe.Refund | null = null;
  for (const p of open) last = await refundPayment(db, p, "The case was cancelled after payment.", actor, client ?? provider());
  return last;
}

/** Appends a refund and its "payment.refunded" event, once per payment; false when it was already there. */
export async function recordRefund(
  db: DbOrTx,
  payment: Payment,
  refund: { id: string; amount: number },
  reason: string,
  actor: { id: string | null },
): Promise<boolean> {
  try {
    return await db.transaction(async (tx) => {
      const [seen] = await tx.select({ id: refunds.id }).from(refunds).where(or(eq(refunds.paymentId, payment.id), eq(refunds.refundId, refund.id)));
      if (seen) return false;
      const [c] = await tx.select({ code: serviceCases.code }).from(serviceCases).where(eq(serviceCases.id, payment.caseId));
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station: SERVICE_STATION,
        type: "payment.refunded",
        subjectKind: "case",
        subjectId: payment.caseId,
        data: { code: c?.code ?? "", refundId: refund.id, amountMinor: refund.amount, currency: payment.currency },
        reason,
      });
      await tx.insert(refunds).values({ paymentId: payment.id, caseId: payment.caseId, refundId: refund.id, amountMinor: refund.amount, currency: payment.currency, reason, eventId, createdAt: now() });
      return true;
    });
  } catch (e) {
    if (isConstraintError(e, "UNIQUE")) return false;
    throw e;
  }
}
