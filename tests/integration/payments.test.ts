/**
 * Quotes, the payment link, the signed webhook and refunds, end to end through the provider's own
 * SDK (the `stripe` package) against the local stand-in (lib/payments/stand-in.ts), and the webhook
 * route itself (app/api/v1/payments/webhook) behind a small HTTP server, as the provider calls it.
 * Signatures are made with the SDK's own `webhooks.generateTestHeaderString`.
 */
import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { join } from "node:path";
import { count, eq, sql } from "drizzle-orm";
import Stripe from "stripe";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { outbox, paymentRequests, payments, quotes, refunds, serviceCases } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { requestPayment } from "@/lib/payments/checkout";
import { providerClient, readProviderConfig } from "@/lib/payments/provider";
import { createQuote, currentQuote } from "@/lib/payments/quotes";
import { refundForCancelledCase } from "@/lib/payments/refunds";
import { handleProviderEvent } from "@/lib/payments/webhook";
import { startPaymentStandIn, type PaymentStandIn } from "@/lib/payments/stand-in";
import { changeCaseState } from "@/lib/service/desk";
import { caseMessages } from "@/lib/service/queries";
import { moveCase } from "@/lib/service/states";
import { POST as webhookRoute } from "@/app/api/v1/payments/webhook/route";
import { startSession } from "@/lib/auth/sessions";
import type { FormState } from "@/lib/forms";
import { createQuoteAction, refundCaseAction, sendPaymentLinkAction } from "@/app/(workshop)/service/cases/[code]/quote/actions";
import { unrefundedPayments } from "@/lib/payments/queries";
import { snapshot } from "../fixtures/access/snapshot";
import { request } from "../setup/next-request";
import { daysAgo, makeServiceCase, type MadeCase } from "../fixtures/service-case";
import { failureText } from "./helpers";

const KEY = "sk_test_payments_walk";
const SECRET = "whsec_payments_walk";
const APP = "http://localhost:3000";
const EUR = { code: "EUR", exponent: 2 };

let standIn: PaymentStandIn;
let hook: Server;
let sdk: Stripe;

beforeAll(async () => {
  await seedDemo(getDb(), { history: false });
  // The provider's webhook calls arrive here and go to the route handler as Next would hand them on.
  hook = createServer((req, res) => {
    const chunks: Buffer[] = [];
    req.on("data", (c: Buffer) => chunks.push(c));
    req.on("end", async () => {
      const headers = new Headers();
      for (const [k, v] of Object.entries(req.headers)) if (typeof v === "string") headers.set(k, v);
      const out = await webhookRoute(new Request(`${APP}/api/v1/payments/webhook`, { method: "POST", headers, body: Buffer.concat(chunks) }), { params: Promise.resolve({}) });
      res.writeHead(out.status, { "content-type": "application/json" });
      res.end(await out.text());
    });
  });
  await new Promise<void>((ok) => hook.listen(0, "127.0.0.1", ok));
  standIn = await startPaymentStandIn({
    stateFile: join(process.env.TWINLEAF_TEST_DIR!, "fake-payments.json"),
    secretKey: KEY,
    webhookSecret: SECRET,
    webhookUrl: `http://127.0.0.1:${(hook.address() as AddressInfo).port}/api/v1/payments/webhook`,
  });
  process.env.STRIPE_SECRET_KEY = KEY;
  process.env.STRIPE_WEBHOOK_SECRET = SECRET;
  process.env.STRIPE_API_BASE = standIn.url;
  sdk = providerClient(readProviderConfig()!);
});

afterAll(async () => {
  await standIn?.close();
  await new Promise<void>((ok) => (hook ? hook.close(() => ok()) : ok()));
});

const db = () => getDb();
const stateOf = async (caseId: string) => (await db().select({ s: serviceCases.state }).from(serviceCases).where(eq(serviceCases.id, caseId)))[0]!.s;
const eventsOf = async (caseId: string, type: string) =>
  Number((await db().all<{ n: number }>(sql`SELECT count(*) AS n FROM events WHERE subject_id = ${caseId} AND type = ${type}`))[0]!.n);
const countOf = async (table: typeof payments | typeof refunds | typeof paymentRequests, caseId: string) =>
  (await db().select({ n: count() }).from(table).where(eq(table.caseId, caseId)))[0]!.n;

const LINES = [
  { kind: "part" as const, description: "Tweeter, matched to the surviving unit", quantity: "1", unitPrice: "120,50" },
  { kind: "labour" as const, description: "Bench time", quantity: "2", unitPrice: "45" },
];

async function quotedCase(): Promise<MadeCase> {
  const c = await makeServiceCase(db(), { shippedOn: daysAgo(1500), warrantyMonths: 24 });
  await createQuote(db(), { caseId: c.caseId, lines: LINES }, c.actor, EUR);
  return c;
}

/** A webhook delivery the way the provider makes one, signed by the SDK's own test helper. */
async function deliver(payload: string, opts: { secret?: string; timestamp?: number; body?: string } = {}) {
  const header = sdk.webhooks.generateTestHeaderString({ payload, secret: opts.secret ?? SECRET, ...(opts.timestamp ? { timestamp: opts.timestamp } : {}) });
  return webhookRoute(new Request(`${APP}/api/v1/payments/webhook`, { method: "POST", headers: { "stripe-signature": header, "content-type": "application/json" }, body: opts.body ?? payload }), {
    params: Promise.resolve({}),
  });
}

function completedEvent(session: { id: string; amount_total: number; currency: string; payment_intent: string }, eventId = `evt_test_${Math.random().toString(36).slice(2)}`) {
  return JSON.stringify({
    id: eventId,
    object: "event",
    type: "checkout.session.completed",
    created: Math.floor(Date.now() / 1000),
    livemode: false,
    data: { object: { object: "checkout.session", payment_status: "paid", status: "complete", ...session } },
  });
}

describe("quotes", () => {
  test("a quote of parts and labour is kept in minor units, with its event; the newest counts", async () => {
    const c = await quotedCase();
    const q = await currentQuote(db(), c.caseId);
    // 1 × 120.50 + 2 × 45.00 = 210.50 EUR = 21050 cents (ISO 4217: EUR has 2 decimal places).
    expect(q).toMatchObject({ currency: "EUR", totalMinor: 21050 });
    expect(q!.lines.map((l) => l.unitMinor)).toEqual([12050, 4500]);
    expect(await eventsOf(c.caseId, "case.quoted")).toBe(1);
    await createQuote(db(), { caseId: c.caseId, lines: [{ kind: "labour", description: "Bench time", quantity: "1", unitPrice: "60" }] }, c.actor, EUR);
    expect((await currentQuote(db(), c.caseId))!.totalMinor).toBe(6000);
    expect((await db().select({ n: count() }).from(quotes).where(eq(quotes.caseId, c.caseId)))[0]!.n).toBe(2);
  });

  test.each([
    ["three decimals for euros", "12.505", /2 decimal places at most/],
    ["an exponent", "1e3", /not a price/],
    ["a negative price", "-5", /not a price/],
    ["no price", "", /Give a price/],
  ])("a line with %s is refused next to its field, and nothing is written", async (_what, price, message) => {
    const c = await makeServiceCase(db(), { shippedOn: daysAgo(1500), warrantyMonths: 24 });
    const before = await snapshot(db());
    const e = await createQuote(db(), { caseId: c.caseId, lines: [{ kind: "part", description: "Tweeter", quantity: "1", unitPrice: price }] }, c.actor, EUR).catch((x: unknown) => x);
    expect(e).toMatchObject({ status: 400, fieldErrors: { "lines.0.unitPrice": [expect.stringMatching(message)] } });
    expect(await snapshot(db())).toEqual(before);
  });

  test("a speaker in warranty is not quoted (shipped 100 days ago, 24 months' warranty)", async () => {
    const c = await makeServiceCase(db(), { shippedOn: daysAgo(100), warrantyMonths: 24 });
    const before = await snapshot(db());
    expect(await failureText(() => createQuote(db(), { caseId: c.caseId, lines: LINES }, c.actor, EUR))).toMatch(/in warranty until/);
    expect(await snapshot(db())).toEqual(before);
  });
});

describe("the quote in the diagnosis message", () => {
  test("a quote made before the diagnosis rides on the owner's diagnosis message; no link is sent before the diagnosis", async () => {
    const c = await makeServiceCase(db(), { shippedOn: daysAgo(1500), warrantyMonths: 24, state: "received" });
    await createQuote(db(), { caseId: c.caseId, lines: LINES }, c.actor, EUR);
    const before = await snapshot(db());
    expect(await failureText(() => requestPayment(db(), { caseId: c.caseId, appUrl: APP }, c.actor, sdk))).toMatch(/Diagnose the case first/);
    expect(await snapshot(db())).toEqual(before);
    const moved = await changeCaseState(db(), { code: c.code, to: "diagnosed" }, c.actor);
    const [mail] = await db().select().from(outbox).where(eq(outbox.eventId, moved.moveEventId));
    expect(mail!.to).toBe(c.ownerEmail);
    expect(mail!.text).toContain("out of warranty");
    // 1 × 120.50 + 2 × 45.00 = 210.50 EUR (ISO 4217: EUR has 2 decimal places).
    expect(mail!.text).toContain("Bench time × 2: €90.00");
    expect(mail!.text).toContain("Total: €210.50");
  });

  test("a case with nothing found yet is not quoted, and nothing is written", async () => {
    const c = await makeServiceCase(db(), { shippedOn: daysAgo(1500), warrantyMonths: 24, state: "received", finding: false });
    const before = await snapshot(db());
    expect(await failureText(() => createQuote(db(), { caseId: c.caseId, lines: LINES }, c.actor, EUR))).toMatch(/Record what was found first/);
    expect(await snapshot(db())).toEqual(before);
  });
});

describe("the payment link, through the SDK and the stand-in", () => {
  test("sending it opens a session for the quote's total, moves the case to waiting for payment and mails the owner", async () => {
    const c = await quotedCase();
    const req = await requestPayment(db(), { caseId: c.caseId, appUrl: APP }, c.actor, sdk);
    const session = await sdk.checkout.sessions.retrieve(req.sessionId);
    expect(session).toMatchObject({ amount_total: 21050, currency: "eur", mode: "payment", status: "open", metadata: { caseId: c.caseId, quoteId: req.quoteId } });
    expect(session.success_url).toMatch(/^http:\/\/localhost:3000\/api\/v1\/payments\/done\?/);
    expect(await stateOf(c.caseId)).toBe("waiting_payment");
    expect(await eventsOf(c.caseId, "payment.requested")).toBe(1);
    const [mail] = await db().select().from(outbox).where(eq(outbox.to, c.ownerEmail!));
    expect(mail!.text).toContain(session.url!);
    expect(mail!.text).toContain("€210.50");
    // The case lists the link among the owner's messages, with its delivery state.
    const messages = await caseMessages(db(), c.caseId);
    expect(messages.find((m) => m.kind === "payment_link")).toMatchObject({ outcome: "queued", outbox: { to: c.ownerEmail, status: "pending" } });
  });

  test("without an owner's e-mail nothing is sent and nothing written", async () => {
    const c = await makeServiceCase(db(), { shippedOn: daysAgo(1500), warrantyMonths: 24, ownerEmail: null });
    await createQuote(db(), { caseId: c.caseId, lines: LINES }, c.actor, EUR);
    const before = await snapshot(db());
    expect(await failureText(() => requestPayment(db(), { caseId: c.caseId, appUrl: APP }, c.actor, sdk))).toMatch(/no e-mail address/);
    expect(await snapshot(db())).toEqual(before);
  });

  test("the stand-in refuses a wrong key in the provider's error shape, and the SDK reads it", async () => {
    const wrong = providerClient({ secretKey: "sk_test_wrong", api: readProviderConfig()!.api, webhookSecret: null });
    const e = await wrong.checkout.sessions.retrieve("cs_test_none").catch((x: unknown) => x);
    expect(e).toBeInstanceOf(Stripe.errors.StripeAuthenticationError);
    const missing = await sdk.checkout.sessions.retrieve("cs_test_none").catch((x: unknown) => x);
    expect(missing).toMatchObject({ type: "StripeInvalidRequestError", code: "resource_missing", statusCode: 404 });
  });
});

describe("the webhook", () => {
  test("paying on the stand-in's page records the payment once and makes the case ready to repair; a second delivery changes nothing", async () => {
    const c = await quotedCase();
    const req = await requestPayment(db(), { caseId: c.caseId, appUrl: APP }, c.actor, sdk);
    const event = await standIn.pay(req.sessionId);
    expect(standIn.state().deliveries.filter((d) => d.eventId === event.id).map((d) => d.status)).toEqual([200]);
    expect(await countOf(payments, c.caseId)).toBe(1);
    expect(await eventsOf(c.caseId, "payment.received")).toBe(1);
    expect(await stateOf(c.caseId)).toBe("diagnosed");

    const before = await snapshot(db());
    expect(await standIn.redeliver(event.id)).toBe(200);
    expect(await snapshot(db())).toEqual(before);
  });

  test("a double payment (another event for the same session) is not recorded twice", async () => {
    const c = await quotedCase();
    const req = await requestPayment(db(), { caseId: c.caseId, appUrl: APP }, c.actor, sdk);
    const session = { id: req.sessionId, amount_total: 21050, currency: "eur", payment_intent: "pi_test_double_1" };
    expect((await deliver(completedEvent(session))).status).toBe(200);
    const before = await snapshot(db());
    const again = await deliver(completedEvent({ ...session, payment_intent: "pi_test_double_2" }));
    expect(await again.json()).toMatchObject({ received: true, outcome: "already recorded" });
    expect(await snapshot(db())).toEqual(before);
    expect(await countOf(payments, c.caseId)).toBe(1);
  });

  test.each([
    ["a tampered body", { body: "tampered" }],
    ["a wrong secret", { secret: "whsec_someone_else" }],
    ["an old timestamp (10 minutes, past the SDK's 300 s tolerance)", { timestamp: Math.floor(Date.now() / 1000) - 600 }],
  ])("%s is refused with 400 and nothing is written", async (_what, opts) => {
    const c = await quotedCase();
    const req = await requestPayment(db(), { caseId: c.caseId, appUrl: APP }, c.actor, sdk);
    const payload = completedEvent({ id: req.sessionId, amount_total: 21050, currency: "eur", payment_intent: `pi_test_${Math.random().toString(36).slice(2)}` });
    const body = "body" in opts ? payload.replace("21050", "1") : undefined;
    const before = await snapshot(db());
    const res = await deliver(payload, { ...opts, ...(body ? { body } : {}) });
    expect(res.status).toBe(400);
    expect(await res.json()).toEqual({ error: expect.stringMatching(/signature/) });
    expect(await snapshot(db())).toEqual(before);
  });

  test("a replayed event (the same event id again, freshly signed) is ignored", async () => {
    const c = await quotedCase();
    const req = await requestPayment(db(), { caseId: c.caseId, appUrl: APP }, c.actor, sdk);
    const payload = completedEvent({ id: req.sessionId, amount_total: 21050, currency: "eur", payment_intent: "pi_test_replayed" }, "evt_test_replayed");
    expect((await deliver(payload)).status).toBe(200);
    const before = await snapshot(db());
    expect(await (await deliver(payload)).json()).toMatchObject({ outcome: "already recorded" });
    expect(await snapshot(db())).toEqual(before);
  });

  test("an amount other than the one asked is not recorded", async () => {
    const c = await quotedCase();
    const req = await requestPayment(db(), { caseId: c.caseId, appUrl: APP }, c.actor, sdk);
    const res = await deliver(completedEvent({ id: req.sessionId, amount_total: 100, currency: "eur", payment_intent: "pi_test_short" }));
    expect(await res.json()).toMatchObject({ outcome: "ignored" });
    expect(await countOf(payments, c.caseId)).toBe(0);
    expect(await stateOf(c.caseId)).toBe("waiting_payment");
  });
});

describe("refunds", () => {
  test("a case cancelled after payment is refunded through the SDK, once", async () => {
    const c = await quotedCase();
    const req = await requestPayment(db(), { caseId: c.caseId, appUrl: APP }, c.actor, sdk);
    await standIn.pay(req.sessionId);
    await moveCase(db(), { caseId: c.caseId, to: "cancelled", reason: "The owner withdrew the repair." }, c.actor);
    const refund = await refundForCancelledCase(db(), c.caseId, c.actor, sdk);
    expect(refund).toMatchObject({ amount: 21050, status: "succeeded" });
    expect(await countOf(refunds, c.caseId)).toBe(1);
    expect(await eventsOf(c.caseId, "payment.refunded")).toBe(1);
    // The stand-in's charge.refunded webhook arrives after its answer: wait for its delivery.
    await expect.poll(() => standIn.state().deliveries.filter((d) => standIn.state().events[d.eventId]?.type === "charge.refunded").length).toBeGreaterThan(0);
    const before = await snapshot(db());
    expect(await refundForCancelledCase(db(), c.caseId, c.actor, sdk)).toBeNull();
    expect(await snapshot(db())).toEqual(before);
    expect(await eventsOf(c.caseId, "payment.refunded")).toBe(1);
  });

  test("a payment that arrives for a cancelled case is refunded, not taken", async () => {
    const c = await quotedCase();
    const req = await requestPayment(db(), { caseId: c.caseId, appUrl: APP }, c.actor, sdk);
    await moveCase(db(), { caseId: c.caseId, to: "cancelled", reason: "The owner collected the speaker unrepaired." }, c.actor);
    await standIn.pay(req.sessionId);
    expect(await countOf(refunds, c.caseId)).toBe(1);
    expect(await stateOf(c.caseId)).toBe("cancelled");
    expect(Object.values(standIn.state().refunds).filter((r) => r.metadata.caseId === c.caseId)).toHaveLength(1);
  });

  test("when the refund of a cancelled case's payment fails, the provider's next delivery refunds it, once", async () => {
    const c = await quotedCase();
    const req = await requestPayment(db(), { caseId: c.caseId, appUrl: APP }, c.actor, sdk);
    await moveCase(db(), { caseId: c.caseId, to: "cancelled", reason: "The owner collected the speaker unrepaired." }, c.actor);
    const event = JSON.parse(completedEvent({ id: req.sessionId, amount_total: 21050, currency: "eur", payment_intent: "pi_test_late" })) as Stripe.Event;
    // The stand-in knows no such payment, so its refund is refused: the delivery fails (502), the payment stays recorded.
    const refused = await handleProviderEvent(db(), event, sdk).catch((e: unknown) => e);
    expect(refused).toMatchObject({ status: 502 });
    expect(await countOf(payments, c.caseId)).toBe(1);
    expect(await countOf(refunds, c.caseId)).toBe(0);
    // Now the provider can refund it (a stand-in that answers any refund, as the provider would for its own payment).
    const answering = { refunds: { create: async () => ({ id: "re_test_late", amount: 21050 }) } } as unknown as Stripe;
    expect(await handleProviderEvent(db(), event, answering)).toMatchObject({ outcome: "refunded" });
    expect(await handleProviderEvent(db(), event, answering)).toEqual({ outcome: "already recorded" });
    expect(await countOf(refunds, c.caseId)).toBe(1);
    expect(await eventsOf(c.caseId, "payment.refunded")).toBe(1);
  });

  test("when the refund fails at the desk's cancel, the desk is told the case is cancelled but not refunded, and refunds it from the quote page", async () => {
    const c = await quotedCase();
    const req = await requestPayment(db(), { caseId: c.caseId, appUrl: APP }, c.actor, sdk);
    await standIn.pay(req.sessionId);
    expect(await countOf(payments, c.caseId)).toBe(1);
    // The provider refuses the workshop's key for a moment: the refund after the cancel fails.
    process.env.STRIPE_SECRET_KEY = "sk_test_not_this_one";
    let message = "";
    try {
      message = await failureText(() => changeCaseState(db(), { code: c.code, to: "cancelled", reason: "The owner withdrew the repair." }, c.actor));
    } finally {
      process.env.STRIPE_SECRET_KEY = KEY;
    }
    expect(message).toMatch(/is cancelled, but the owner's payment is not refunded yet/);
    expect(await stateOf(c.caseId)).toBe("cancelled");
    expect(await unrefundedPayments(db(), c.caseId)).toBe(1);
    expect(await countOf(refunds, c.caseId)).toBe(0);
    // The desk tries again from the quote page.
    request.sessionId = (await startSession(c.actor.id, db())).session.id;
    const fd = new FormData();
    fd.set("code", c.code);
    expect(await refundCaseAction(undefined, fd)).toMatchObject({ ok: true, message: expect.stringContaining("€210.50") });
    expect(await unrefundedPayments(db(), c.caseId)).toBe(0);
    expect(await eventsOf(c.caseId, "payment.refunded")).toBe(1);
    // A second press finds nothing left to refund and writes nothing.
    expect(await refundCaseAction(undefined, fd)).toMatchObject({ ok: true, message: "There was nothing left to refund." });
    expect(await countOf(refunds, c.caseId)).toBe(1);
  });

  test("an open case's payment is not refunded by the cancel hook", async () => {
    const c = await quotedCase();
    expect(await failureText(() => refundForCancelledCase(db(), c.caseId, c.actor, sdk))).toMatch(/Only a cancelled case/);
  });
});

describe("the quote page's actions, as the browser sends them", () => {
  /** The form's five rows, as FormData carries them: unused rows keep their quantity of 1. */
  function form(code: string, rows: [string, string, string, string][]) {
    const fd = new FormData();
    fd.set("code", code);
    for (const [kind, description, quantity, unitPrice] of rows) {
      fd.append("kind", kind);
      fd.append("description", description);
      fd.append("quantity", quantity);
      fd.append("unitPrice", unitPrice);
    }
    return fd;
  }
  const unused: [string, string, string, string] = ["part", "", "1", ""];
  const call = (action: (prev: FormState | undefined, fd: FormData) => Promise<FormState>, fd: FormData) => action(undefined, fd);

  test("a quote with unused rows is saved; a bad price is answered beside its cell; then the link is sent", async () => {
    const c = await makeServiceCase(db(), { shippedOn: daysAgo(1500), warrantyMonths: 24 });
    request.sessionId = (await startSession(c.actor.id, db())).session.id;
    const before = await snapshot(db(), ["sessions"]);
    const refused = await call(createQuoteAction, form(c.code, [["part", "Tweeter", "1", "120.505"], unused, unused, unused, ["labour", "Bench time", "2", "45"]]));
    expect(refused).toMatchObject({ ok: false, status: 400, fieldErrors: { "lines.0.unitPrice": [expect.stringMatching(/2 decimal places/)] } });
    expect(Object.keys(refused.fieldErrors ?? {})).toEqual(["lines.0.unitPrice"]);
    expect(await snapshot(db(), ["sessions"])).toEqual(before);
    const saved = await call(createQuoteAction, form(c.code, [["part", "Tweeter", "1", "120,50"], unused, unused, unused, ["labour", "Bench time", "2", "45"]]));
    expect(saved).toMatchObject({ ok: true, message: expect.stringContaining("€210.50") });
    const only = new FormData();
    only.set("code", c.code);
    const sent = await call(sendPaymentLinkAction, only);
    expect(sent).toMatchObject({ ok: true });
    expect(await stateOf(c.caseId)).toBe("waiting_payment");
  });
});
