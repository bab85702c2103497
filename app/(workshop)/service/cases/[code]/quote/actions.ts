"use server";
import { getDb } from "@/db";
import { appBaseUrl, guardedAction } from "@/lib/auth/guard";
import { AppError } from "@/lib/auth/errors";
import { requestPayment } from "@/lib/payments/checkout";
import { formatMoney } from "@/lib/payments/money";
import { quotePage } from "@/lib/payments/queries";
import { createQuote } from "@/lib/payments/quotes";
import { refundForCancelledCase } from "@/lib/payments/refunds";
import { paths } from "@/lib/paths";
import { quoteSchema, sendLinkSchema } from "./schemas";

async function caseOf(code: string) {
  const page = await quotePage(getDb(), code);
  if (!page) throw new AppError(404, `No service case ${code}.`);
  return page;
}

export const createQuoteAction = guardedAction("service.work", quoteSchema, async (input, user) => {
  const c = await caseOf(input.code);
  const lines = input.description.map((description, i) => ({
    kind: input.kind[i] ?? "part",
    description,
    quantity: input.quantity[i] ?? "",
    unitPrice: input.unitPrice[i] ?? "",
  }));
  const quote = await createQuote(getDb(), { caseId: c.caseId, lines }, { id: user.id }, c.currency);
  return {
    ok: true,
    message: `Quoted ${formatMoney(quote.totalMinor, c.currency)} for case ${c.code}.`,
    revalidate: [paths.serviceQuote(c.code), paths.serviceCase(c.code)],
  };
});

export const sendPaymentLinkAction = guardedAction("service.work", sendLinkSchema, async (input, user) => {
  const c = await caseOf(input.code);
  await requestPayment(getDb(), { caseId: c.caseId, appUrl: await appBaseUrl() }, { id: user.id });
  return {
    ok: true,
    message: `The payment link is on its way to ${c.owner?.email ?? "the owner"}. The case waits for payment.`,
    revalidate: [paths.serviceQuote(c.code), paths.serviceCase(c.code), paths.service],
  };
});

export const refundCaseAction = guardedAction("service.work", sendLinkSchema, async (input, user) => {
  const c = await caseOf(input.code);
  const refund = await refundForCancelledCase(getDb(), c.caseId, { id: user.id });
  return {
    ok: true,
    message: refund ? `Refunded ${formatMoney(refund.amount, c.currency)} to the owner.` : "There was nothing left to refund.",
    revalidate: [paths.serviceQuote(c.code), paths.serviceCase(c.code)],
  };
});
