/** Quotes for out-of-warranty repairs: parts and labour in minor units; the newest one counts. */
import "server-only";
import { warrantyFacts } from "@/lib/service/queries";
import { randomUUID } from "node:crypto";
import { desc, eq, sql } from "drizzle-orm";
import { z } from "zod";
import type { DbOrTx } from "@/db";
import { caseFindings, quotes, serviceCases, type Quote, type QuoteLine } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { SERVICE_STATION } from "@/lib/service/states";
import type { Actor } from "@/lib/vocabulary/actor";
import { CASE_STATE_WORDS, type CaseState } from "@/lib/vocabulary/case-states";
import { parseMoney, totalMinor, workshopCurrency, type Currency } from "./money";

/**
 * States in which a repair may be quoted: once something was found (so the diagnosis message can
 * carry the quote), until the repair.
 */
export const QUOTABLE_STATES: readonly CaseState[] = ["received", "diagnosed", "waiting_part", "waiting_payment"];
/** States from which the owner is sent a link to pay: after the diagnosis, before the repair. */
export const PAYABLE_STATES: readonly CaseState[] = ["diagnosed", "waiting_part", "waiting_payment"];

export const MAX_LINES = 30;

/** A line as typed on the quote page (the price still text). */
export interface TypedLine {
  kind: "part" | "labour";
  description: string;
  quantity: string;
  unitPrice: string;
}

export const typedLine = z.object({
  kind: z.enum(["part", "labour"]),
  description: z.string(),
  quantity: z.string(),
  unitPrice: z.string(),
});

/**
 * Reads typed lines into quote lines, or refuses with a message per field ("lines.2.unitPrice").
 * Unused rows (no description and no price) are left out.
 */
export function readLines(typed: readonly TypedLine[], currency: Currency): { lines: QuoteLine[]; errors: Record<string, string[]> } {
  const lines: QuoteLine[] = [];
  const errors: Record<string, string[]> = {};
  const add = (key: string, message: string) => (errors[key] ??= []).push(message);
  typed.forEach((l, i) => {
    const description = l.description.trim();
    // A row with neither words nor a price is an unused row of the form (its quantity starts at 1).
    if (!description && !l.unitPrice.trim()) return;
    if (!description) add(`lines.${i}.description`, "Say what this line is for.");
    else if (description.length > 200) add(`lines.${i}.description`, "At most 200 characters.");
    const q = l.quantity.trim() || "1";
    const quantity = /^\d{1,4}$/.test(q) ? Number(q) : NaN;
    if (!Number.isInteger(quantity) || quantity < 1 || quantity > 1000) add(`lines.${i}.quantity`, "A whole number from 1 to 1000.");
    const price = parseMoney(l.unitPrice, currency);
    if (!price.ok) add(`lines.${i}.unitPrice`, price.message);
    if (description && description.length <= 200 && Number.isInteger(quantity) && price.ok) lines.push({ kind: l.kind, description, quantity, unitMinor: price.minor });
  });
  if (!lines.length && !Object.keys(errors).length) add("lines", "A quote needs at least one line.");
  if (lines.length > MAX_LINES) add("lines", `At most ${MAX_LINES} lines.`);
  if (!Object.keys(errors).length) {
    try {
      if (totalMinor(lines) <= 0) add("lines", "The total is nothing: a repair with nothing to pay needs no quote.");
    } catch {
      add("lines", "The total is too large.");
    }
  }
  return { lines, errors };
}

/**
 * Whether the case's speaker is out of warranty on the day it came back: the pair's ship day plus
 * its model's warranty months. The lead may point this at the service core's own warranty reading
 * (the two must agree); it is kept here so a quote can never be made for a case in warranty.
 */
export async function outOfWarranty(db: DbOrTx, caseId: string): Promise<{ outOf: boolean; endsOn: string | null }> {
  const [c] = await db.select().from(serviceCases).where(eq(serviceCases.id, caseId));
  if (!c) throw new AppError(404, "No such service case.");
  // The desk's one warranty rule (lib/service/warranty.ts), so the quote and the case agree.
  const w = await warrantyFacts(db, c);
  // No ship day on record: the speaker never left under a warranty this register knows, so it is charged.
  if (!w) return { outOf: true, endsOn: null };
  return { outOf: !w.inWarranty, endsOn: w.endsOn };
}

/** Records a quote (appended; it replaces the case's last one) with its "case.quoted" event. */
export async function createQuote(
  db: DbOrTx,
  input: { caseId: string; lines: readonly TypedLine[] },
  actor: Actor,
  currency: Currency = workshopCurrency(),
): Promise<Quote> {
  const { lines, errors } = readLines(input.lines, currency);
  if (Object.keys(errors).length) throw new AppError(400, "Some lines need attention. Nothing was saved.", errors);
  const work = async (tx: DbOrTx) => {
    const [c] = await tx.select().from(serviceCases).where(eq(serviceCases.id, input.caseId));
    if (!c) throw new AppError(404, "No such service case.");
    if (!QUOTABLE_STATES.includes(c.state)) {
      throw new AppError(409, `A case that is “${CASE_STATE_WORDS[c.state]}” cannot be quoted: quote once something is found and before the repair. Nothing was saved.`);
    }
    const [found] = await tx.select({ id: caseFindings.id }).from(caseFindings).where(eq(caseFindings.caseId, c.id)).limit(1);
    if (!found) throw new AppError(409, "Record what was found first: the quote is for the repair of a finding. Nothing was saved.");
    const w = await outOfWarranty(tx, c.id);
    if (!w.outOf) throw new AppError(409, `This speaker is in warranty until ${w.endsOn}: the repair is not charged, so it needs no quote. Nothing was saved.`);
    const total = totalMinor(lines);
    const id = randomUUID();
    const eventId = await appendEvent(tx, {
      actorId: actor.id,
      station: SERVICE_STATION,
      type: "case.quoted",
      subjectKind: "case",
      subjectId: c.id,
      data: { code: c.code, quoteId: id, currency: currency.code, totalMinor: total, lines: lines.length },
    });
    const [row] = await tx.insert(quotes).values({ id, caseId: c.id, currency: currency.code, lines, totalMinor: total, eventId, createdAt: now() }).returning();
    return row!;
  };
  return "rollback" in db ? work(db) : db.transaction(work);
}

/** The case's quote that counts: the newest. */
export async function currentQuote(db: DbOrTx, caseId: string): Promise<Quote | null> {
  const [row] = await db.select().from(quotes).where(eq(quotes.caseId, caseId)).orderBy(desc(quotes.createdAt), desc(sql`rowid`)).limit(1);
  return row ?? null;
}
