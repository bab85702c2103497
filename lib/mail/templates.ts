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
