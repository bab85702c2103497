import { sql } from "drizzle-orm";
import { check, index, integer, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { events } from "./events";
import { serviceCases } from "./service";

/** One line of a quote: what, how many, and the price of one in minor units (cents, pence, yen). */
export interface QuoteLine {
  kind: "part" | "labour";
  description: string;
  quantity: number;
  unitMinor: number;
}

/**
 * A quote for an out-of-warranty repair. Appended, never changed: a new quote replaces the last
 * one by being newer. Money is always integers of the currency's minor unit.
 */
export const quotes = sqliteTable(
  "quotes",
  {
    id: text("id").primaryKey(),
    caseId: text("case_id")
      .notNull()
      .references(() => serviceCases.id),
    /** ISO 4217 code, e.g. "EUR". */
    currency: text("currency").notNull(),
    lines: text("lines", { mode: "json" }).$type<QuoteLine[]>().notNull(),
    totalMinor: integer("total_minor").notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [
    index("quotes_case_idx").on(t.caseId, t.createdAt),
    check("quotes_currency", sql`${t.currency} GLOB '[A-Z][A-Z][A-Z]'`),
    check("quotes_total", sql`${t.totalMinor} > 0`),
  ],
);

/** A payment link sent to the owner: the provider's checkout session for one quote. */
export const paymentRequests = sqliteTable(
  "payment_requests",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    caseId: text("case_id")
      .notNull()
      .references(() => serviceCases.id),
    quoteId: text("quote_id")
      .notNull()
      .references(() => quotes.id),
    /** The provider's checkout session id ("cs_…"). */
    sessionId: text("session_id").notNull().unique(),
    amountMinor: integer("amount_minor").notNull(),
    currency: text("currency").notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [index("payment_requests_case_idx").on(t.caseId, t.createdAt)],
);

/**
 * A payment the provider confirmed. Recorded once: the provider's event id and its checkout
 * session are each unique, so a webhook delivered twice finds its row already there.
 */
export const payments = sqliteTable(
  "payments",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    caseId: text("case_id")
      .notNull()
      .references(() => serviceCases.id),
    quoteId: text("quote_id")
      .notNull()
      .references(() => quotes.id),
    sessionId: text("session_id").notNull(),
    /** The provider's payment id ("pi_…"), which a refund names. */
    paymentIntentId: text("payment_intent_id").notNull(),
    providerEventId: text("provider_event_id").notNull(),
    amountMinor: integer("amount_minor").notNull(),
    currency: text("currency").notNull(),
    /** Its "payment.received" event (a payment for a cancelled case is recorded, then refunded). */
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [
    uniqueIndex("payments_session_unique").on(t.sessionId),
    uniqueIndex("payments_provider_event_unique").on(t.providerEventId),
    uniqueIndex("payments_intent_unique").on(t.paymentIntentId),
    index("payments_case_idx").on(t.caseId),
    check("payments_amount", sql`${t.amountMinor} > 0`),
  ],
);

/** A refund of a payment, recorded once per payment (the whole amount is given back). */
export const refunds = sqliteTable(
  "refunds",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    paymentId: integer("payment_id")
      .notNull()
      .references(() => payments.id),
    caseId: text("case_id")
      .notNull()
      .references(() => serviceCases.id),
    /** The provider's refund id ("re_…"). */
    refundId: text("refund_id").notNull(),
    amountMinor: integer("amount_minor").notNull(),
    currency: text("currency").notNull(),
    reason: text("reason").notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [uniqueIndex("refunds_payment_unique").on(t.paymentId), uniqueIndex("refunds_refund_unique").on(t.refundId)],
);

export type Quote = typeof quotes.$inferSelect;
export type PaymentRequest = typeof paymentRequests.$inferSelect;
export type Payment = typeof payments.$inferSelect;
export type Refund = typeof refunds.$inferSelect;
