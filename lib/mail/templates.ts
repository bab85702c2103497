export interface MailContent {
  subject: string;
  text: string;
  html: string;
}

const HTML_ESCAPES: Record<string, string> = { "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" };

/** Escapes text for HTML element content and for quoted attribute values. */
export function escapeHtml(value: string): string {
  return value.replace(/[&<>"']/g, (c) => HTML_ESCAPES[c]!);
}

// Escaping keeps a link from breaking out of its attribute, but a javascript: or data: URL
// would still run when clicked, so only web links are accepted.
function webLink(link: string): string {
  let url: URL;
  try {
    url = new URL(link);
  } catch {
    throw new Error("the mail link is not a valid URL");
  }
  if (url.protocol !== "https:" && url.protocol !== "http:") throw new Error("the mail link must be an http(s) URL");
  return url.href;
}

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? "" : "s"}`;

// Shared frame: paragraphs of escaped text around one button-like link.
function htmlBody(paragraphsBefore: string[], link: string, linkLabel: string, paragraphsAfter: string[]): string {
  const p = (t: string) => `<p style="margin:0 0 16px">${t}</p>`;
  const href = escapeHtml(link);
  return [
    "<!doctype html>",
    '<html lang="en"><body style="margin:0;padding:24px;background:#f6f4ef;color:#23211d;font:16px/1.5 system-ui,sans-serif">',
    '<div style="max-width:520px;margin:0 auto;background:#ffffff;padding:24px;border-radius:8px">',
    ...paragraphsBefore.map(p),
    `<p style="margin:0 0 16px"><a href="${href}" style="display:inline-block;padding:10px 18px;background:#2f4a3a;color:#ffffff;text-decoration:none;border-radius:6px">${escapeHtml(linkLabel)}</a></p>`,
    p(`If the button does not work, copy this address into your browser:<br><span style="word-break:break-all">${href}</span>`),
    ...paragraphsAfter.map(p),
    p("Twinleaf"),
    "</div></body></html>",
  ].join("\n");
}

export function inviteMail(input: { name: string; link: string; invitedBy: string; expiresHours: number }): MailContent {
  const link = webLink(input.link);
  const expiry = plural(input.expiresHours, "hour");
  const subject = "Your invitation to Twinleaf";
  const text = [
    `Hello ${input.name},`,
    "",
    `${input.invitedBy} has given you an account on Twinleaf, the workshop's register of matched pairs.`,
    "",
    "To choose your password and sign in, open this link:",
    link,
    "",
    `The link can be used once and expires in ${expiry}. If you were not expecting this, you can ignore this message.`,
    "",
    "Twinleaf",
    "",
  ].join("\n");
  const html = htmlBody(
    [
      `Hello ${escapeHtml(input.name)},`,
      `${escapeHtml(input.invitedBy)} has given you an account on Twinleaf, the workshop's register of matched pairs.`,
    ],
    link,
    "Choose your password",
    [`The link can be used once and expires in ${escapeHtml(expiry)}. If you were not expecting this, you can ignore this message.`],
  );
  return { subject, text, html };
}

export function resetMail(input: { name: string; link: string; expiresMinutes: number }): MailContent {
  const link = webLink(input.link);
  const expiry = plural(input.expiresMinutes, "minute");
  const subject = "Resetting your Twinleaf password";
  const text = [
    `Hello ${input.name},`,
    "",
    "A new password was asked for your Twinleaf account. If that was you, open this link to choose one:",
    link,
    "",
    `The link can be used once and expires in ${expiry}. If you did not ask for this, ignore this message: your password stays as it is.`,
    "",
    "Twinleaf",
    "",
  ].join("\n");
  const html = htmlBody(
    [
      `Hello ${escapeHtml(input.name)},`,
      "A new password was asked for your Twinleaf account. If that was you, use the link below to choose one.",
    ],
    link,
    "Choose a new password",
    [`The link can be used once and expires in ${escapeHtml(expiry)}. If you did not ask for this, ignore this message: your password stays as it is.`],
  );
  return { subject, text, html };
}

// ——— The service desk's messages to an owner ———

/** A quote as the owner reads it: lines in minor units of one currency (ISO 4217), never floats. */
export interface OwnerQuote {
  lines: { description: string; amountMinor: number }[];
  totalMinor: number;
  currency: string;
}

/**
 * An amount in minor units as money: the currency's own number of minor digits (ISO 4217, as
 * Intl reports it), with the decimal point placed in the digits' text so no float is rounded.
 */
export function formatMinor(amountMinor: number, currency: string): string {
  if (!Number.isSafeInteger(amountMinor)) throw new RangeError("an amount is a whole number of minor units");
  const fmt = new Intl.NumberFormat("en-GB", { style: "currency", currency });
  const digits = fmt.resolvedOptions().maximumFractionDigits ?? 2;
  const sign = amountMinor < 0 ? "-" : "";
  const abs = String(Math.abs(amountMinor)).padStart(digits + 1, "0");
  const decimal = digits === 0 ? abs : `${abs.slice(0, -digits)}.${abs.slice(-digits)}`;
  // Intl reads a decimal string exactly (ECMA-402 "Intl.NumberFormat v3").
  return fmt.format(`${sign}${decimal}` as unknown as number);
}

export type CaseMessageKind = "received" | "diagnosis" | "on_its_way" | "closed";

export interface CaseMessageInput {
  kind: CaseMessageKind;
  ownerName: string;
  caseCode: string;
  /** What came back, e.g. "the left speaker of pair P-…" (already in words). */
  what: string;
  model: string;
  /** Workshop day it was received, already formatted. */
  receivedOn?: string;
  findings?: string[];
  inWarranty?: boolean;
  quote?: OwnerQuote | null;
  /** Where it is going back to, in words ("to you", "to Willow Hi-Fi"). */
  sentTo?: string | null;
  /** A one-time link that withdraws the owner's consent to further mail (lib/owners/registrations.ts). */
  withdrawLink?: string | null;
}

const WITHDRAW_WORDS = "If you would rather not hear from us about recalls and service, you can withdraw your consent here:";

/** The closing lines every message to an owner carries: how to stop further mail. */
function withdrawLines(link: string | null | undefined): { text: string[]; html: string[] } {
  if (!link) return { text: [], html: [] };
  const href = webLink(link);
  return {
    text: [WITHDRAW_WORDS, href, ""],
    html: [`<span style="font-size:14px;color:#5b574f">${escapeHtml(WITHDRAW_WORDS)}<br><a href="${escapeHtml(href)}" style="color:#2f4a3a;word-break:break-all">${escapeHtml(href)}</a></span>`],
  };
}

/**
 * The confirmation an owner gets after registering their pair on the certificate check: nothing
 * counts until they open the link. It also carries the link to withdraw consent.
 */
export function registrationMail(input: { name: string; pair: string; model: string; consent: boolean; link: string; withdrawLink: string | null; expiresHours: number }): MailContent {
  const link = webLink(input.link);
  const expiry = plural(input.expiresHours, "hour");
  const subject = `Confirm the registration of your ${input.model}`;
  const intro = `Thank you for registering your ${input.model}, pair ${input.pair}. To confirm that this is your e-mail address and finish the registration, open this link and press the button:`;
  const consentLine = input.consent
    ? "You asked us to send you recall notices and service mail about this pair."
    : "You did not ask for recall notices or service mail; we will only write about the registration itself.";
  const after = `The link can be used once and expires in ${expiry}. If you did not register a pair, ignore this message: nothing is recorded until the link is used.`;
  const withdraw = withdrawLines(input.withdrawLink);
  const text = [`Hello ${input.name},`, "", intro, link, "", consentLine, "", after, "", ...withdraw.text, "Twinleaf", ""].join("\n");
  const html = htmlBody([escapeHtml(`Hello ${input.name},`), escapeHtml(intro)], link, "Confirm my registration", [escapeHtml(consentLine), escapeHtml(after), ...withdraw.html]);
  return { subject, text, html };
}

function plainFrame(paragraphs: string[]): string {
  const p = (t: string) => `<p style="margin:0 0 16px">${t}</p>`;
  return [
    "<!doctype html>",
    '<html lang="en"><body style="margin:0;padding:24px;background:#f6f4ef;color:#23211d;font:16px/1.5 system-ui,sans-serif">',
    '<div style="max-width:520px;margin:0 auto;background:#ffffff;padding:24px;border-radius:8px">',
    ...paragraphs.map(p),
    p("Twinleaf"),
    "</div></body></html>",
  ].join("\n");
}

/**
 * One of the four messages to an owner about their case. Every value is escaped in the HTML; the
 * text part carries the same words.
 */
export function caseMessageMail(input: CaseMessageInput): MailContent {
  const e = escapeHtml;
  const hello = `Hello ${input.ownerName},`;
  let subject: string;
  let paras: string[];
  switch (input.kind) {
    case "received":
      subject = `We have received your ${input.model} (case ${input.caseCode})`;
      paras = [`We received ${input.what} on ${input.receivedOn ?? "the day it arrived"} and opened service case ${input.caseCode}.`, "We will look at it and write again once we know what needs doing."];
      break;
    case "diagnosis": {
      subject = `What we found in your ${input.model} (case ${input.caseCode})`;
      const found = input.findings?.length ? `We found: ${input.findings.join("; ")}.` : "We have looked at it.";
      const cover = input.inWarranty === false ? "It is out of warranty, so the repair is charged." : input.inWarranty === true ? "It is in warranty: the repair costs you nothing." : "";
      paras = [found, cover].filter(Boolean);
      if (input.quote) {
        const lines = input.quote.lines.map((l) => `${l.description}: ${formatMinor(l.amountMinor, input.quote!.currency)}`);
        paras.push(`Our quote:\n${lines.join("\n")}\nTotal: ${formatMinor(input.quote.totalMinor, input.quote.currency)}`);
        paras.push("A link to pay follows in a separate message; we go ahead once it is paid.");
      } else if (input.inWarranty === false) {
        paras.push("We will send you a quote with a link to pay before we go ahead.");
      }
      break;
    }
    case "on_its_way":
      subject = `Your ${input.model} is repaired and on its way (case ${input.caseCode})`;
      paras = [`The repair is done and the pair passed its test again. ${input.what.charAt(0).toUpperCase()}${input.what.slice(1)} is on its way back${input.sentTo ? ` ${input.sentTo}` : ""}.`];
      break;
    case "closed":
      subject = `Service case ${input.caseCode} is closed`;
      paras = [`We have closed service case ${input.caseCode} for your ${input.model}. Thank you for your patience.`];
      break;
  }
  const withdraw = withdrawLines(input.withdrawLink);
  const text = [hello, "", ...paras.flatMap((p) => [p, ""]), ...withdraw.text, "Twinleaf", ""].join("\n");
  const html = plainFrame([e(hello), ...paras.map((p) => e(p).replace(/\n/g, "<br>")), ...withdraw.html]);
  return { subject, text, html };
}

/**
 * A containment's notice to a dealer: one message listing every affected serial that went to them,
 * what is suspect, and what to do. Plain text and HTML carry the same words.
 */
export function containmentDealerMail(input: {
  dealerName: string;
  code: string;
  target: string;
  reason: string;
  severity: string;
  serials: { serial: string; what: string }[];
}): MailContent {
  const subject = `Containment ${input.code}: ${plural(input.serials.length, "serial")} you received may be affected`;
  const intro = `We have raised containment ${input.code} (${input.severity.toLowerCase()}) on ${input.target}: ${input.reason}`;
  const ask =
    "Please do not sell or hand over the serials below until we have been in touch. Set any you hold aside, tell us which have gone to customers, and reply to arrange their inspection.";
  const lines = input.serials.map((s) => `${s.serial} (${s.what})`);
  const text = [`Hello ${input.dealerName},`, "", intro, "", ask, "", "Affected serials:", ...lines.map((l) => `- ${l}`), "", "Twinleaf", ""].join("\n");
  const list = `<ul style="margin:0;padding-left:20px">${lines.map((l) => `<li>${escapeHtml(l)}</li>`).join("")}</ul>`;
  const html = plainFrame([escapeHtml(`Hello ${input.dealerName},`), escapeHtml(intro), escapeHtml(ask), `Affected serials:${list}`]);
  return { subject, text, html };
}

/**
 * A containment's notice to an owner who registered a pair and agreed to recall notices: in plain
 * words, what may be wrong and what to do. It carries the link to withdraw consent.
 */
export function containmentOwnerMail(input: {
  ownerName: string;
  code: string;
  pairs: { pair: string; model: string }[];
  /** Quality's words for owners; without them the message says only that a part may be faulty. */
  reason: string | null;
  critical: boolean;
  dealers: string[];
  withdrawLink: string | null;
}): MailContent {
  const pairs = input.pairs.map((p) => `${p.model}, pair ${p.pair}`);
  const subject = `Safety and quality notice for your ${input.pairs.length === 1 ? input.pairs[0]!.model : "speakers"} (${input.code})`;
  const intro = `We have found that a part used in ${pairs.length === 1 ? "your speakers" : "some of your speakers"} may be faulty${input.reason ? `: ${input.reason}` : "."}`;
  const which = `This concerns: ${pairs.join("; ")}.`;
  const now = input.critical
    ? "Please stop using the speakers and switch off and unplug the amplifier that drives them until they have been checked."
    : "You can go on using your speakers, but please have them checked soon.";
  const how = `Contact ${input.dealers.length ? input.dealers.join(" or ") : "the dealer you bought them from"}, or reply to this message, quoting ${input.code}, to arrange the check.`;
  const withdraw = withdrawLines(input.withdrawLink);
  const text = [`Hello ${input.ownerName},`, "", intro, "", which, "", now, "", how, "", ...withdraw.text, "Twinleaf", ""].join("\n");
  const html = plainFrame([escapeHtml(`Hello ${input.ownerName},`), escapeHtml(intro), escapeHtml(which), escapeHtml(now), escapeHtml(how), ...withdraw.html]);
  return { subject, text, html };
}
