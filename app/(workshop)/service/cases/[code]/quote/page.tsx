import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { QuoteForm } from "@/components/service/quote-form";
import { QuoteSend, RefundSend } from "@/components/service/quote-send";
import { BackLink } from "@/components/ui/back-link";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { Table, TD, TH, TR } from "@/components/ui/table";
import { getDb } from "@/db";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { formatCalendarDay, formatShopTime } from "@/lib/format";
import { currencyOf, formatMoney, priceExample } from "@/lib/payments/money";
import { quotePage } from "@/lib/payments/queries";
import { paths } from "@/lib/paths";
import { CASE_STATE_WORDS } from "@/lib/vocabulary/case-states";
import { createQuoteAction, refundCaseAction, sendPaymentLinkAction } from "./actions";
import { QUOTE_ROWS } from "./schemas";

export const metadata: Metadata = { title: "Quote and payment" };

export default async function Page({ params }: { params: Promise<{ code: string }> }) {
  await requirePage("service.work");
  const code = pageParam((await params).code);
  const c = await quotePage(getDb(), code);
  if (!c) notFound();
  const money = (minor: number, currency = c.currency.code) => formatMoney(minor, currencyOf(currency) ?? c.currency);
  const now = new Date();
  const q = c.quote;

  return (
    <div className="flex flex-col gap-6" data-testid="quote-page">
      <BackLink href={paths.serviceCase(c.code)}>{`Case ${c.code}`}</BackLink>
      <PageHeader
        title={`Quote for case ${c.code}`}
        lead={
          <>
            Speaker <span className="serial">{c.serial}</span> · {CASE_STATE_WORDS[c.state]}
            {c.owner ? ` · ${c.owner.name}` : ""}
          </>
        }
      />

      <Panel title="Warranty">
        {c.warranty.outOf ? (
          <p data-testid="warranty-over">
            Out of warranty{c.warranty.endsOn ? `: it ended on ${formatCalendarDay(c.warranty.endsOn, now)}` : ": no shipment of this pair is on record"}. The repair is charged to the owner.
          </p>
        ) : (
          <Notice tone="info" testId="warranty-in">
            In warranty until {formatCalendarDay(c.warranty.endsOn!, now)}: the repair is not charged, so it needs no quote.
          </Notice>
        )}
      </Panel>

      <Panel title="The quote">
        {q ? (
          <div className="flex flex-col gap-2" data-testid="current-quote">
            <Table>
              <thead>
                <TR>
                  <TH>What</TH>
                  <TH>Kind</TH>
                  <TH className="text-right">How many</TH>
                  <TH className="text-right">Price of one</TH>
                  <TH className="text-right">Amount</TH>
                </TR>
              </thead>
              <tbody>
                {q.lines.map((l, i) => (
                  <TR key={i}>
                    <TD>{l.description}</TD>
                    <TD>{l.kind === "part" ? "Part" : "Labour"}</TD>
                    <TD className="text-right">{l.quantity}</TD>
                    <TD className="text-right">{money(l.unitMinor, q.currency)}</TD>
                    <TD className="text-right">{money(l.quantity * l.unitMinor, q.currency)}</TD>
                  </TR>
                ))}
                <TR>
                  <TD className="font-bold">Total</TD>
                  <TD />
                  <TD />
                  <TD />
                  <TD className="text-right font-bold" data-testid="quote-total">
                    {money(q.totalMinor, q.currency)}
                  </TD>
                </TR>
              </tbody>
            </Table>
            <p className="text-sm text-ink-soft">Quoted {formatShopTime(q.createdAt, now, { zone: true })}.</p>
          </div>
        ) : (
          <p>No quote yet.</p>
        )}
      </Panel>

      {c.warranty.outOf && c.quotable && !c.paid ? (
        <Panel title={q ? "A new quote" : "Make the quote"}>
          <QuoteForm code={c.code} currency={c.currency.code} example={priceExample(c.currency)} rows={QUOTE_ROWS} action={createQuoteAction} />
        </Panel>
      ) : null}

      {q && c.quotable && !c.paid ? (
        <Panel title="Payment link">
          {!c.payable ? (
            <Notice tone="info" testId="quote-before-diagnosis">
              The owner reads this quote in the diagnosis message. Mark the case diagnosed on its page, then send the link to pay here.
            </Notice>
          ) : c.owner?.email ? (
            <QuoteSend code={c.code} to={c.owner.email} total={money(q.totalMinor, q.currency)} action={sendPaymentLinkAction} />
          ) : (
            <Notice tone="danger" testId="no-owner-email">
              The owner has no e-mail address on record, so no payment link can reach them. Add one on the case first.
            </Notice>
          )}
        </Panel>
      ) : null}

      {c.state === "cancelled" && c.unrefunded > 0 ? (
        <Panel title="Refund">
          <RefundSend code={c.code} action={refundCaseAction} />
        </Panel>
      ) : null}

      <Panel title="Payments">
        {c.history.requests.length === 0 && c.history.payments.length === 0 ? (
          <p>No payment link sent yet.</p>
        ) : (
          <ul className="flex flex-col gap-1" data-testid="payment-history">
            {c.history.payments.map((p, i) => (
              <li key={`p${i}`}>
                Paid {money(p.amountMinor, p.currency)} {formatShopTime(p.at, now)}
                {p.refundedAt ? `; refunded ${money(p.refundMinor ?? p.amountMinor, p.currency)} ${formatShopTime(p.refundedAt, now)}` : ""}.
              </li>
            ))}
            {c.history.requests.map((r, i) => (
              <li key={`r${i}`}>
                Payment link for {money(r.amountMinor, r.currency)} sent {formatShopTime(r.at, now)}.
              </li>
            ))}
          </ul>
        )}
      </Panel>
    </div>
  );
}
