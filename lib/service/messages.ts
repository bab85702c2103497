/** The desk's messages to an owner, queued through the outbox in the transaction of their event. */
import "server-only";
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { caseFindings, items, models, type ServiceCase } from "@/db/schema";
import { formatCalendarDay } from "@/lib/format";
import { queueMail } from "@/lib/mail/outbox";
import { caseMessageMail, type CaseMessageKind, type OwnerQuote } from "@/lib/mail/templates";
import { ownerById, type OwnerWithConsent } from "@/lib/owners";
import { issueConsentLink, mailBaseUrl, ownerLinkPaths } from "@/lib/owners/registrations";
import { positionName } from "@/lib/vocabulary/positions";

export type { CaseMessageKind, OwnerQuote };

export type OwnerMailOutcome = "queued" | "no_owner" | "no_email" | "no_consent";

/** Why no message can go to this owner, or "queued" when one may. Consent must have been given. */
export function ownerMailOutcome(owner: Pick<OwnerWithConsent, "email" | "consent"> | null): OwnerMailOutcome {
  if (!owner) return "no_owner";
  if (!owner.email) return "no_email";
  if (!owner.consent?.given) return "no_consent";
  return "queued";
}

/** The desk's words for an outcome, shown on the case. */
export const OWNER_MAIL_WORDS: Record<OwnerMailOutcome, string> = {
  queued: "Sent through the outbox",
  no_owner: "Not sent: the case names no owner",
  no_email: "Not sent: the owner has no e-mail address on record",
  no_consent: "Not sent: the owner has not agreed to be contacted",
};

/** A case message, or the link to pay an out-of-warranty repair (lib/payments/checkout). */
export type OwnerMessageKind = CaseMessageKind | "payment_link";

export const CASE_MESSAGE_WORDS: Record<OwnerMessageKind, string> = {
  received: "Case received",
  diagnosis: "Diagnosis",
  payment_link: "Quote with a link to pay",
  on_its_way: "Repaired and on its way",
  closed: "Case closed",
};

/** What goes in the event's data so the case can say what became of its message. */
export const ownerMailData = (kind: OwnerMessageKind, outcome: OwnerMailOutcome) => ({ ownerMail: { kind, outcome } });

/**
 * Queues one message to the case's owner for the event `eventId` (which must carry
 * `ownerMailData(kind, outcome)` with the outcome `ownerMailOutcome` gave), in the caller's
 * transaction. Does nothing when the outcome is not "queued". `quote` rides on a diagnosis of a
 * speaker out of warranty.
 */
export async function queueOwnerMessage(
  tx: DbOrTx,
  input: { case: ServiceCase; kind: CaseMessageKind; eventId: number; inWarranty?: boolean; quote?: OwnerQuote | null; sentTo?: string | null },
): Promise<OwnerMailOutcome> {
  const owner = input.case.ownerId ? await ownerById(tx, input.case.ownerId) : null;
  const outcome = ownerMailOutcome(owner);
  if (outcome !== "queued") return outcome;
  const [item] = await tx.select({ identity: items.identity, kind: items.kind }).from(items).where(eq(items.id, input.case.itemId));
  const [pair] = await tx.select({ identity: items.identity, model: models.name }).from(items).leftJoin(models, eq(models.id, items.modelId)).where(eq(items.id, input.case.pairId));
  const what = item?.kind === "pair" ? `your pair ${item.identity}` : `speaker ${item?.identity ?? ""} of your pair ${pair?.identity ?? ""}`;
  const findings =
    input.kind === "diagnosis"
      ? (await tx.select().from(caseFindings).where(eq(caseFindings.caseId, input.case.id))).map((f) => `${f.side === "L" ? "left" : "right"} speaker, ${positionName(f.position)}: ${f.finding}`)
      : undefined;
  // Every message to an owner carries its own one-time link to withdraw consent.
  const withdraw = await issueConsentLink(tx, { ownerId: owner!.id });
  const mail = caseMessageMail({
    kind: input.kind,
    ownerName: owner!.name,
    caseCode: input.case.code,
    what,
    model: pair?.model ?? "speakers",
    receivedOn: formatCalendarDay(input.case.receivedOn, new Date(0)),
    findings,
    inWarranty: input.inWarranty,
    quote: input.quote ?? null,
    sentTo: input.sentTo ?? null,
    withdrawLink: `${mailBaseUrl()}${ownerLinkPaths.consent(withdraw)}`,
  });
  await queueMail(tx, { to: owner!.email!, subject: mail.subject, text: mail.text, html: mail.html, eventId: input.eventId, secrets: [withdraw] });
  return outcome;
}
