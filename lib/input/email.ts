/**
 * The one e-mail address field of every form and route (sign-in, reset, invitations, owners).
 * RFC 5321 §4.5.3.1: a path is at most 256 octets with its angle brackets, so an address is at
 * most 254 characters, its local part at most 64 (§4.5.3.1.1); a domain label is at most 63
 * (RFC 1035 §2.3.4). zod's check takes the common shape name@host.tld.
 */
import { z } from "zod";

export const EMAIL_MAX = 254;
export const EMAIL_LOCAL_MAX = 64;
export const EMAIL_LABEL_MAX = 63;

export const EMAIL_MESSAGE = "Enter a whole e-mail address, like name@example.test.";
export const EMAIL_TOO_LONG = `An e-mail address is at most ${EMAIL_MAX} characters.`;

const shape = z.email();

/** Within the lengths of RFC 5321 and the common shape; `email` as stored (trimmed, lower case). */
export function isEmailAddress(email: string): boolean {
  if (email.length > EMAIL_MAX) return false;
  const at = email.lastIndexOf("@");
  if (at < 1 || at > EMAIL_LOCAL_MAX) return false;
  if (email.slice(at + 1).split(".").some((label) => label.length > EMAIL_LABEL_MAX)) return false;
  return shape.safeParse(email).success;
}

/** Trimmed and lower-cased, then checked; `required` is the message for an empty field. */
export const emailAddress = (required = "Enter an e-mail address.") =>
  z
    .string({ error: required })
    .trim()
    .toLowerCase()
    .min(1, required)
    .superRefine((email, ctx) => {
      if (email.length === 0) return;
      if (email.length > EMAIL_MAX) ctx.addIssue({ code: "custom", message: EMAIL_TOO_LONG });
      else if (!isEmailAddress(email)) ctx.addIssue({ code: "custom", message: EMAIL_MESSAGE });
    });
