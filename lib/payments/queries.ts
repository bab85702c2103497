/** What the quote page shows of a case: its speaker, owner, warranty, quote and payments. */
import "server-only";
import { eq, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { items, owners, payments, serviceCases } from "@/db/schema";
import { normaliseCaseCode } from "@/lib/service/code";
import { paidFor, paymentHistory } from "./checkout";
import { currencyOf, workshopCurrency, type Currency } from "./money";
import { currentQuote, outOfWarranty, PAYABLE_STATES, QUOTABLE_STATES } from "./quotes";

export async function quotePage(db: DbOrTx, typed: string) {
  const code = normaliseCaseCode(typed);
  if (!code) return null;
  const [row] = await db
    .select({ c: serviceCases, serial: items.identity, ownerName: owners.name, ownerEmail: owners.email })
    .from(serviceCases)
    .innerJoin(items, eq(items.id, serviceCases.itemId))
    .leftJoin(owners, eq(owners.id, serviceCases.ownerId))
    .where(eq(serviceCases.code, code));
  if (!row) return null;
  const quote = await currentQuote(db, row.c.id);
  const currency: Currency = (quote && currencyOf(quote.currency)) || workshopCurrency();
  return {
    caseId: row.c.id,
    code: row.c.code,
    state: row.c.state,
    serial: row.serial,
    owner: row.ownerName ? { name: row.ownerName, email: row.ownerEmail } : null,
    warranty: await outOfWarranty(db, row.c.id),
    quotable: QUOTABLE_STATES.includes(row.c.state),
    payable: PAYABLE_STATES.includes(row.c.state),
    quote,
    currency,
    paid: (await paidFor(db, row.c.id)) !== null,
    unrefunded: await unrefundedPayments(db, row.c.id),
    history: await paymentHistory(db, row.c.id),
  };
}

export type QuotePage = NonNullable<Awaited<ReturnType<typeof quotePage>>>;

/** How many of the case's payments have no refund (for a cancelled case: what is still owed back). */
export async function unrefundedPayments(db: DbOrTx, caseId: string): Promise<number> {
  const [row] = await db
    .select({ n: sql<number>`count(*)` })
    .from(payments)
    .where(sql`${payments.caseId} = ${caseId} AND NOT EXISTS (SELECT 1 FROM refunds r WHERE r.payment_id = ${payments.id})`);
  return Number(row?.n ?? 0);
}
