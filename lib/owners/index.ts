/** Owners of pairs and their ownerships: who holds a shipped pair, from when. */
import "server-only";
import { and, asc, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { items, ownerConsents, owners, ownerships, type Owner } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import type { Actor } from "@/lib/vocabulary/actor";

export interface OwnerDetails {
  name: string;
  email: string | null;
  town: string;
  /** ISO 3166-1 alpha-2, e.g. "GB". */
  country: string;
}

const oneLine = (v: string) => v.trim().replace(/\s+/g, " ");

/**
 * An owner's particulars tidied (one-line name and town, e-mail in lower case, country in capitals)
 * and checked; a refusal is a 400 with the reason next to each field, e.g. `owner.email`.
 */
export function checkOwner(input: OwnerDetails, fieldPrefix = ""): OwnerDetails {
  const owner = { name: oneLine(input.name), email: input.email?.trim() ? input.email.trim().toLowerCase() : null, town: oneLine(input.town), country: input.country.trim().toUpperCase() };
  const errors: Record<string, string[]> = {};
  if (!owner.name) errors[`${fieldPrefix}name`] = ["Give the owner's name."];
  else if (owner.name.length > 200) errors[`${fieldPrefix}name`] = ["The name is at most 200 characters."];
  if (!owner.town) errors[`${fieldPrefix}town`] = ["Give the owner's town."];
  else if (owner.town.length > 120) errors[`${fieldPrefix}town`] = ["The town is at most 120 characters."];
  // ISO 3166-1 alpha-2: two capital letters (the code list itself is not kept here).
  if (!/^[A-Z]{2}$/.test(owner.country)) errors[`${fieldPrefix}country`] = ["Give the country as two letters, e.g. GB."];
  if (owner.email !== null && (owner.email.length > 254 || !/^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(owner.email))) errors[`${fieldPrefix}email`] = ["Give an e-mail address like name@example.com, or none."];
  if (Object.keys(errors).length) throw new AppError(400, `Nothing was saved: ${Object.values(errors)[0]![0]}`, errors);
  return owner;
}

/**
 * Registers `owner` as holding the pair from now, in one transaction: the owner is found by
 * e-mail (or registered when new), the ownership appended with its "ownership.registered" event.
 * Only a pair that has shipped has an owner; the same owner is not registered twice for one pair.
 */
export async function registerOwnership(db: DbOrTx, input: { pairId: string; owner: OwnerDetails }, actor: Actor): Promise<{ ownerId: string; newOwner: boolean }> {
  return db.transaction((tx) => registerOwnershipIn(tx, input, actor));
}

/**
 * registerOwnership inside the caller's transaction. `via` marks how it was registered in the
 * event (any mark but DESK_REGISTRATION starts the warranty); an owner's own confirmed
 * registration passes `actor` null (no account made it) and its registration's id in `data`.
 */
export async function registerOwnershipIn(
  tx: DbOrTx,
  input: { pairId: string; owner: OwnerDetails; via?: string; data?: Record<string, unknown> },
  actor: Actor | null,
): Promise<{ ownerId: string; newOwner: boolean }> {
  const owner = checkOwner(input.owner);
  const [pair] = await tx.select().from(items).where(and(eq(items.id, input.pairId), eq(items.kind, "pair"))).limit(1);
  if (!pair) throw new AppError(404, "That pair is not in the register.");
  if (pair.state !== "shipped") throw new AppError(409, `${pair.identity} has not shipped yet: a pair has an owner once it has left the workshop.`);
  const at = now();
  const [known] = owner.email ? await tx.select({ id: owners.id }).from(owners).where(and(sql`lower(${owners.email}) = ${owner.email}`, isNull(owners.mergedIntoId))).limit(1) : [];
  let ownerId = known?.id;
  if (ownerId) {
    if (await holdsPair(tx, ownerId, pair.id)) throw new AppError(409, `${owner.name} is already registered as an owner of ${pair.identity}.`);
  } else {
    ownerId = newId();
    await tx.insert(owners).values({ id: ownerId, ...owner, createdAt: at });
  }
  await appendOwnership(tx, { pair, ownerId, newOwner: !known, at, via: input.via, data: input.data }, actor);
  return { ownerId, newOwner: !known };
}

/** Whether this owner is registered for this pair already. */
export async function holdsPair(tx: DbOrTx, ownerId: string, pairId: string): Promise<boolean> {
  const [already] = await tx.select({ id: ownerships.id }).from(ownerships).where(and(eq(ownerships.ownerId, ownerId), eq(ownerships.itemId, pairId))).limit(1);
  return Boolean(already);
}

async function appendOwnership(
  tx: DbOrTx,
  input: { pair: { id: string; identity: string }; ownerId: string; newOwner: boolean; at: Date; via?: string; data?: Record<string, unknown> },
  actor: Actor | null,
) {
  const eventId = await appendEvent(tx, {
    actorId: actor?.id ?? null,
    station: "service",
    type: "ownership.registered",
    subjectKind: "item",
    subjectId: input.pair.id,
    // The owner's particulars stay in their record; the log names them by id.
    data: { identity: input.pair.identity, ownerId: input.ownerId, newOwner: input.newOwner, ...(input.via ? { via: input.via } : {}), ...(input.data ?? {}) },
    at: input.at,
  });
  await tx.insert(ownerships).values({ ownerId: input.ownerId, itemId: input.pair.id, since: input.at, eventId });
}

/** How an ownership the desk recorded at intake is marked: it does not start a warranty. */
export const DESK_REGISTRATION = "service intake";

/** How an owner's own registration, confirmed by e-mail, is marked: it starts the warranty like any but the desk's. */
export const OWNER_REGISTRATION = "owner registration";

/**
 * Inside the caller's transaction: registers the owner the service desk names for a pair that came
 * back, unless they are registered for it already. Returns whether an ownership was appended.
 */
export async function registerOwnerAtDesk(tx: DbOrTx, input: { pair: { id: string; identity: string }; ownerId: string; newOwner: boolean; at: Date }, actor: Actor): Promise<boolean> {
  if (await holdsPair(tx, input.ownerId, input.pair.id)) return false;
  await appendOwnership(tx, { ...input, via: DESK_REGISTRATION }, actor);
  return true;
}

export interface OwnerWithConsent extends Owner {
  /** The newest word on being contacted, or null when none was ever recorded. */
  consent: { given: boolean; at: Date } | null;
}

/** The newest consent of each owner (the table is appended: the last row counts). */
async function consentsOf(db: DbOrTx, ownerIds: string[]): Promise<Map<string, { given: boolean; at: Date }>> {
  if (ownerIds.length === 0) return new Map();
  const rows = await db
    .select({ ownerId: ownerConsents.ownerId, consent: ownerConsents.consent, at: ownerConsents.at })
    .from(ownerConsents)
    .where(inArray(ownerConsents.ownerId, ownerIds))
    .orderBy(asc(ownerConsents.id));
  const out = new Map<string, { given: boolean; at: Date }>();
  for (const r of rows) out.set(r.ownerId, { given: r.consent, at: r.at });
  return out;
}

/** An owner with their newest consent, or null. */
export async function ownerById(db: DbOrTx, id: string): Promise<OwnerWithConsent | null> {
  const [row] = await db.select().from(owners).where(eq(owners.id, id)).limit(1);
  if (!row) return null;
  return { ...row, consent: (await consentsOf(db, [row.id])).get(row.id) ?? null };
}

/** The owners registered for a pair, first registered first, with their consent. */
export async function ownersOfPair(db: DbOrTx, pairId: string): Promise<(OwnerWithConsent & { since: Date })[]> {
  const rows = await db
    .select({ owner: owners, since: ownerships.since })
    .from(ownerships)
    .innerJoin(owners, eq(owners.id, ownerships.ownerId))
    // A record merged into another is history: its survivor holds the pair now.
    .where(and(eq(ownerships.itemId, pairId), isNull(owners.mergedIntoId)))
    .orderBy(asc(ownerships.since));
  const consents = await consentsOf(db, rows.map((r) => r.owner.id));
  return rows.map((r) => ({ ...r.owner, since: r.since, consent: consents.get(r.owner.id) ?? null }));
}

/** Owners whose name or e-mail holds `text` (case ignored), newest first: for picking one on record. */
export async function findOwners(db: DbOrTx, text: string, limit = 20): Promise<OwnerWithConsent[]> {
  const q = text.trim().toLowerCase();
  if (q.length < 2) return [];
  // LIKE's wildcards in what was typed are matched as themselves.
  const pattern = `%${q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
  const rows = await db
    .select()
    .from(owners)
    .where(and(isNull(owners.mergedIntoId), sql`(lower(${owners.name}) LIKE ${pattern} ESCAPE '\\' OR lower(coalesce(${owners.email}, '')) LIKE ${pattern} ESCAPE '\\')`))
    .orderBy(desc(owners.createdAt))
    .limit(limit);
  const consents = await consentsOf(db, rows.map((r) => r.id));
  return rows.map((r) => ({ ...r, consent: consents.get(r.id) ?? null }));
}

/**
 * Appends an owner's word on being contacted, with its "owner.consent_recorded" event, in the
 * caller's transaction. The newest row counts; nothing earlier is changed.
 */
export async function recordConsent(tx: DbOrTx, input: { ownerId: string; consent: boolean; data?: Record<string, unknown> }, actor: Actor | null): Promise<number> {
  const at = now();
  const eventId = await appendEvent(tx, {
    actorId: actor?.id ?? null,
    station: "service",
    type: "owner.consent_recorded",
    subjectKind: "owner",
    subjectId: input.ownerId,
    data: { consent: input.consent, ...(input.data ?? {}) },
    at,
  });
  await tx.insert(ownerConsents).values({ ownerId: input.ownerId, consent: input.consent, at, eventId });
  return eventId;
}

/**
 * Finds the owner by e-mail, or adds a new one, in the caller's transaction. It registers no
 * ownership: an owner first named at the service desk is not a warranty registration (that would
 * move the warranty's start to the day the speaker came back).
 */
export async function ownerOnRecord(tx: DbOrTx, details: OwnerDetails): Promise<{ ownerId: string; newOwner: boolean }> {
  const owner = checkOwner(details, "owner.");
  const [known] = owner.email ? await tx.select({ id: owners.id }).from(owners).where(and(sql`lower(${owners.email}) = ${owner.email}`, isNull(owners.mergedIntoId))).limit(1) : [];
  if (known) return { ownerId: known.id, newOwner: false };
  const ownerId = newId();
  await tx.insert(owners).values({ id: ownerId, ...owner, createdAt: now() });
  return { ownerId, newOwner: true };
}
