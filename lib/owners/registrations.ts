/**
 * An owner's own registration of their pair from the public certificate check, confirmed by a link
 * mailed to them (double opt-in), and the one-time links in every message to owners that withdraw
 * their consent. Nothing the public form does tells anyone whether an e-mail is known or a pair
 * already has owners: the caller answers the same whatever happens here.
 */
import "server-only";
import { and, desc, eq, gt, isNotNull, isNull, or, sql } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db";
import { items, models, ownerConsentLinks, ownerRegistrations, owners } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { normaliseEmail } from "@/lib/auth/throttle";
import { hashToken, newId, newToken } from "@/lib/auth/tokens";
import { now } from "@/lib/clock";
import { pairOfCertificate } from "@/lib/dispatch/verify";
import { appendEvent } from "@/lib/events/queries";
import { reserve, type Limit } from "@/lib/limits";
import { queueMail } from "@/lib/mail/outbox";
import { registrationMail } from "@/lib/mail/templates";
import { checkOwner, holdsPair, ownerById, OWNER_REGISTRATION, recordConsent, registerOwnershipIn, type OwnerDetails } from "./index";

/** The confirmation link waits three days (an owner may read mail at the weekend); a consent link works for a year. */
export const REGISTRATION_TTL_HOURS = 72;
export const CONSENT_LINK_TTL_DAYS = 365;

/** Registrations asked for: 3 per e-mail and 10 per client address an hour (lib/limits keys). */
export const REGISTRATION_LIMIT = { windowMs: 60 * 60_000, perEmail: 3, perAddress: 10 };

export function registrationLimits(email: string, address: string): Limit[] {
  const { windowMs, perEmail, perAddress } = REGISTRATION_LIMIT;
  return [
    { key: `owner-registration:email:${email}`, windowMs, max: perEmail },
    { key: `owner-registration:address:${address}`, windowMs, max: perAddress },
  ];
}

/** Public pages of the links in owners' mail (kept here so lib/ builds them without app/). */
export const ownerLinkPaths = {
  confirm: (token: string) => `/verify/registration/${token}`,
  consent: (token: string) => `/verify/consent/${token}`,
};

/** Where links in mail the sender delivers point: APP_URL, as for certificates (lib/mail/sender.ts). */
export function mailBaseUrl(): string {
  return (process.env.APP_URL || "http://localhost:3000").replace(/\/$/, "");
}

export interface RegistrationRequest extends OwnerDetails {
  /** Consent to recall notices and service mail. */
  consent: boolean;
}

/**
 * Takes an owner's registration of the pair whose certificate code the page shows: a pending
 * registration, its event and the confirmation mail, in one transaction. Returns nothing on
 * purpose: over a limit, for an unknown or unshipped pair, for an owner already registered for the
 * pair or already waiting to confirm, nothing is written and the caller's answer is the same.
 * Bad particulars are a 400 with the reason by each field (they say nothing about anyone else).
 */
export async function requestRegistration(db: Db, input: { code: string; details: RegistrationRequest; baseUrl: string; address: string }): Promise<void> {
  if (!input.details.email?.trim()) throw new AppError(400, "Nothing was saved: give your e-mail address.", { email: ["Give your e-mail address: the confirmation link goes there."] });
  const owner = checkOwner(input.details);
  const email = normaliseEmail(owner.email!);
  const allowed = await reserve(db, registrationLimits(email, input.address || "unknown"), { now: now(), state: "counted" });
  if (!allowed.ok) return;
  const pair = await pairOfCertificate(db, input.code);
  if (!pair?.shipped) return;
  await db.transaction(async (tx) => {
    const [known] = await tx.select({ id: owners.id }).from(owners).where(sql`lower(${owners.email}) = ${email}`).limit(1);
    if (known && (await holdsPair(tx, known.id, pair.id))) return;
    const at = now();
    const [waiting] = await tx
      .select({ id: ownerRegistrations.id })
      .from(ownerRegistrations)
      .where(and(eq(ownerRegistrations.pairId, pair.id), eq(ownerRegistrations.email, email), isNull(ownerRegistrations.confirmedAt), gt(ownerRegistrations.expiresAt, at)))
      .limit(1);
    // The first link still works; a second would only fill the owner's inbox.
    if (waiting) return;
    const id = newId();
    const token = newToken();
    const eventId = await appendEvent(tx, {
      actorId: null,
      station: "service",
      type: "ownership.requested",
      subjectKind: "item",
      subjectId: pair.id,
      // The owner's particulars stay in the registration; the log names it by id.
      data: { identity: pair.identity, registrationId: id },
      at,
    });
    const expiresAt = new Date(at.getTime() + REGISTRATION_TTL_HOURS * 3600_000);
    await tx.insert(ownerRegistrations).values({ id, pairId: pair.id, ...owner, email, consent: input.details.consent, tokenHash: hashToken(token), expiresAt, createdAt: at, eventId });
    // A link to withdraw consent goes only where consent was given: there is nothing else to withdraw.
    const withdraw = input.details.consent ? await issueConsentLink(tx, { registrationId: id }) : null;
    const [model] = await tx.select({ name: models.name }).from(items).leftJoin(models, eq(models.id, items.modelId)).where(eq(items.id, pair.id));
    const mail = registrationMail({
      name: owner.name,
      pair: pair.identity,
      model: model?.name ?? "speakers",
      consent: input.details.consent,
      link: `${input.baseUrl}${ownerLinkPaths.confirm(token)}`,
      withdrawLink: withdraw ? `${input.baseUrl}${ownerLinkPaths.consent(withdraw)}` : null,
      expiresHours: REGISTRATION_TTL_HOURS,
    });
    await queueMail(tx, { to: email, ...mail, eventId, secrets: withdraw ? [token, withdraw] : [token] });
  });
}

/** A registration waiting for its confirmation link, as the link's page shows it; null for a forged, used or expired link. */
export async function findPendingRegistration(db: DbOrTx, token: string): Promise<{ id: string; name: string; email: string; pair: string; consent: boolean } | null> {
  const [row] = await db
    .select({ id: ownerRegistrations.id, name: ownerRegistrations.name, email: ownerRegistrations.email, pair: items.identity, consent: ownerRegistrations.consent })
    .from(ownerRegistrations)
    .innerJoin(items, eq(items.id, ownerRegistrations.pairId))
    .where(and(eq(ownerRegistrations.tokenHash, hashToken(token)), isNull(ownerRegistrations.confirmedAt), gt(ownerRegistrations.expiresAt, now())))
    .limit(1);
  return row ?? null;
}

export const REGISTRATION_LINK_GONE = "This link has expired or has already been used, so nothing was changed. To register your pair, open its certificate check again and send the form once more.";
export const ALREADY_REGISTERED = "You are already registered as an owner of this pair, so nothing was changed.";

/**
 * Confirms a registration from its mailed link, in one transaction: the owner (found by e-mail, or
 * added), the ownership (marked OWNER_REGISTRATION, so it starts the warranty), the owner's word on
 * being contacted as the form gave it (or withdrawn, if they used the withdrawal link first) and
 * the registration marked confirmed. A forged, used or expired link is a 410 and writes nothing;
 * an owner who holds the pair already (another registration confirmed first) a 409.
 */
export async function confirmRegistration(db: Db, input: { token: string }): Promise<{ pair: string; ownerId: string; consent: boolean }> {
  return db.transaction(async (tx) => {
    const found = await findPendingRegistration(tx, input.token);
    if (!found) throw new AppError(410, REGISTRATION_LINK_GONE);
    const [reg] = await tx.select().from(ownerRegistrations).where(eq(ownerRegistrations.id, found.id));
    const [known] = await tx.select({ id: owners.id }).from(owners).where(sql`lower(${owners.email}) = ${reg!.email}`).limit(1);
    if (known && (await holdsPair(tx, known.id, reg!.pairId))) throw new AppError(409, ALREADY_REGISTERED);
    const { ownerId } = await registerOwnershipIn(
      tx,
      { pairId: reg!.pairId, owner: { name: reg!.name, email: reg!.email, town: reg!.town, country: reg!.country }, via: OWNER_REGISTRATION, data: { registrationId: reg!.id } },
      null,
    );
    const confirmed = await tx
      .update(ownerRegistrations)
      .set({ confirmedAt: now(), ownerId })
      .where(and(eq(ownerRegistrations.id, reg!.id), isNull(ownerRegistrations.confirmedAt)))
      .returning({ id: ownerRegistrations.id });
    if (confirmed.length !== 1) throw new AppError(410, REGISTRATION_LINK_GONE);
    const [withdrawn] = await tx
      .select({ id: ownerConsentLinks.id })
      .from(ownerConsentLinks)
      .where(and(eq(ownerConsentLinks.registrationId, reg!.id), isNotNull(ownerConsentLinks.usedAt)))
      .limit(1);
    const consent = reg!.consent && !withdrawn;
    await recordConsent(tx, { ownerId, consent, data: { via: OWNER_REGISTRATION, registrationId: reg!.id } }, null);
    return { pair: found.pair, ownerId, consent };
  });
}

/**
 * Makes a one-time consent-withdrawal link for an owner on record or for a registration (pending
 * or confirmed), in the caller's transaction, and returns its token: it goes into the mail only,
 * as a secret of queueMail, and the table keeps its hash.
 */
export async function issueConsentLink(tx: DbOrTx, subject: { ownerId: string } | { registrationId: string }): Promise<string> {
  const token = newToken();
  const at = now();
  await tx.insert(ownerConsentLinks).values({
    id: newId(),
    tokenHash: hashToken(token),
    registrationId: "registrationId" in subject ? subject.registrationId : null,
    ownerId: "ownerId" in subject ? subject.ownerId : null,
    createdAt: at,
    expiresAt: new Date(at.getTime() + CONSENT_LINK_TTL_DAYS * 86_400_000),
  });
  return token;
}

/** A usable consent link with the name it greets; null for a forged, used or expired one. */
export async function findConsentLink(db: DbOrTx, token: string): Promise<{ id: string; name: string; ownerId: string | null; registrationId: string | null } | null> {
  const [row] = await db
    .select({ id: ownerConsentLinks.id, ownerId: ownerConsentLinks.ownerId, registrationId: ownerConsentLinks.registrationId, ownerName: owners.name, regName: ownerRegistrations.name, regOwner: ownerRegistrations.ownerId })
    .from(ownerConsentLinks)
    .leftJoin(owners, eq(owners.id, ownerConsentLinks.ownerId))
    .leftJoin(ownerRegistrations, eq(ownerRegistrations.id, ownerConsentLinks.registrationId))
    .where(and(eq(ownerConsentLinks.tokenHash, hashToken(token)), isNull(ownerConsentLinks.usedAt), gt(ownerConsentLinks.expiresAt, now())))
    .limit(1);
  if (!row) return null;
  return { id: row.id, name: row.ownerName ?? row.regName ?? "", ownerId: row.ownerId ?? row.regOwner ?? null, registrationId: row.registrationId };
}

export const CONSENT_LINK_GONE = "This link has expired or has already been used, so nothing was changed. Every message we send you carries a fresh one.";

/**
 * Withdraws consent from a link in a message, in one transaction: the link is spent, and the owner's
 * consent appended as withdrawn (an owner_consents row, never an edit). For a registration not yet
 * confirmed there is no owner yet: the spent link is the record (with its event), and confirming
 * the registration later records consent as withdrawn. A forged, used or expired link is a 410
 * and writes nothing.
 */
export async function withdrawConsent(db: Db, input: { token: string }): Promise<{ pending: boolean }> {
  return db.transaction(async (tx) => {
    const link = await findConsentLink(tx, input.token);
    if (!link) throw new AppError(410, CONSENT_LINK_GONE);
    const spent = await tx
      .update(ownerConsentLinks)
      .set({ usedAt: now() })
      .where(and(eq(ownerConsentLinks.id, link.id), isNull(ownerConsentLinks.usedAt)))
      .returning({ id: ownerConsentLinks.id });
    if (spent.length !== 1) throw new AppError(410, CONSENT_LINK_GONE);
    if (link.ownerId) {
      await recordConsent(tx, { ownerId: link.ownerId, consent: false, data: { via: "link in a message" } }, null);
      return { pending: false };
    }
    await appendEvent(tx, {
      actorId: null,
      station: "service",
      type: "owner.consent_recorded",
      subjectKind: "owner_registration",
      subjectId: link.registrationId!,
      data: { consent: false, via: "link in a message" },
    });
    return { pending: true };
  });
}

export type RegistrationStatus = "pending" | "confirmed" | "expired";

export interface RegistrationRow {
  id: string;
  name: string;
  email: string;
  town: string;
  country: string;
  pair: string;
  status: RegistrationStatus;
  createdAt: Date;
  confirmedAt: Date | null;
  ownerId: string | null;
  /**
   * Whether mail may go: for a confirmed registration the owner's newest consent; for one not yet
   * confirmed the box as ticked, unless withdrawn from the link already.
   */
  consent: boolean;
}

async function rowsWhere(db: DbOrTx, where: ReturnType<typeof and>): Promise<RegistrationRow[]> {
  const rows = await db
    .select({ reg: ownerRegistrations, pair: items.identity })
    .from(ownerRegistrations)
    .innerJoin(items, eq(items.id, ownerRegistrations.pairId))
    .where(where)
    .orderBy(desc(ownerRegistrations.createdAt));
  const at = now();
  const out: RegistrationRow[] = [];
  for (const { reg, pair } of rows) {
    const status: RegistrationStatus = reg.confirmedAt ? "confirmed" : reg.expiresAt > at ? "pending" : "expired";
    let consent = reg.consent;
    if (reg.ownerId) consent = (await ownerById(db, reg.ownerId))?.consent?.given ?? false;
    else if (consent) {
      const [used] = await db.select({ id: ownerConsentLinks.id }).from(ownerConsentLinks).where(and(eq(ownerConsentLinks.registrationId, reg.id), isNotNull(ownerConsentLinks.usedAt))).limit(1);
      consent = !used;
    }
    out.push({ id: reg.id, name: reg.name, email: reg.email, town: reg.town, country: reg.country, pair, status, createdAt: reg.createdAt, confirmedAt: reg.confirmedAt, ownerId: reg.ownerId, consent });
  }
  return out;
}

/** Every registration an owner made for this pair from the certificate check, newest first. */
export function registrationsOfPair(db: DbOrTx, pairId: string): Promise<RegistrationRow[]> {
  return rowsWhere(db, and(eq(ownerRegistrations.pairId, pairId)));
}

/** An owner's registrations: those confirmed as them, and those waiting under their e-mail. */
export async function registrationsOfOwner(db: DbOrTx, ownerId: string): Promise<RegistrationRow[]> {
  const [owner] = await db.select({ email: owners.email }).from(owners).where(eq(owners.id, ownerId)).limit(1);
  if (!owner) return [];
  const mine = eq(ownerRegistrations.ownerId, ownerId);
  return rowsWhere(db, and(owner.email ? or(mine, and(isNull(ownerRegistrations.ownerId), eq(ownerRegistrations.email, owner.email.toLowerCase()))) : mine));
}
