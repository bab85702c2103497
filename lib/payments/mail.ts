// The owner's message with the payment link: short, plain, with the amount and what it is for.
import { escapeHtml, type MailContent } from "@/lib/mail/templates";

export function paymentLinkMail(input: {
  ownerName: string;
  caseCode: string;
  serial: string;
  lines: { description: string; quantity: number; amount: string }[];
  total: string;
  link: string;
}): MailContent {
  const url = new URL(input.link);
  if (url.protocol !== "https:" && url.protocol !== "http:") throw new Error("the payment link must be an http(s) URL");
  const link = url.href;
  const subject = `Your repair ${input.caseCode}: payment of ${input.total}`;
  const lineText = input.lines.map((l) => `  ${l.quantity} × ${l.description}: ${l.amount}`);
  const text = [
    `Hello ${input.ownerName},`,
    "",
    `Your speaker ${input.serial} is out of warranty, so we have quoted its repair (case ${input.caseCode}):`,
    ...lineText,
    `  Total: ${input.total}`,
    "",
    "To pay and let us start the repair, open this secure payment page:",
    link,
    "",
    "If the repair is cancelled after you have paid, the whole amount is refunded. Reply to this message with any question.",
    "",
    "Twinleaf service desk",
    "",
  ].join("\n");
  const p = (t: string) => `<p style="margin:0 0 16px">${t}</p>`;
  const rows = input.lines
    .map((l) => `<tr><td style="padding:2px 8px 2px 0">${l.quantity} × ${escapeHtml(l.description)}</td><td style="text-align:right">${escapeHtml(l.amount)}</td></tr>`)
    .join("");
  const href = escapeHtml(link);
  const html = [
    "<!doctype html>",
    '<html lang="en"><body style="margin:0;padding:24px;background:#f6f4ef;color:#23211d;font:16px/1.5 system-ui,sans-serif">',
    '<div style="max-width:520px;margin:0 auto;background:#ffffff;padding:24px;border-radius:8px">',
    p(`Hello ${escapeHtml(input.ownerName)},`),
    p(`Your speaker <span style="font-family:monospace">${escapeHtml(input.serial)}</span> is out of warranty, so we have quoted its repair (case ${escapeHtml(input.caseCode)}):`),
    `<table style="margin:0 0 16px;border-collapse:collapse">${rows}<tr><td style="padding:6px 8px 0 0;font-weight:bold">Total</td><td style="padding-top:6px;text-align:right;font-weight:bold">${escapeHtml(input.total)}</td></tr></table>`,
    `<p style="margin:0 0 16px"><a href="${href}" style="display:inline-block;padding:10px 18px;background:#2f4a3a;color:#ffffff;text-decoration:none;border-radius:6px">Pay ${escapeHtml(input.total)}</a></p>`,
    p(`If the button does not work, copy this address into your browser:<br><span style="word-break:break-all">${href}</span>`),
    p("If the repair is cancelled after you have paid, the whole amount is refunded. Reply to this message with any question."),
    p("Twinleaf service desk"),
    "</div></body></html>",
  ].join("\n");
  return { subject, text, html };
}
