/**
 * Owners as the admin keeps them: a record corrected (the row updated, the before and after and
 * the reason appended as an event) and two records of one person merged (the duplicate's
 * ownerships and consent appended to the survivor; the duplicate stays, pointing at it).
 */
import "server-only";
import { and, asc, count, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db";
import { events, items, ownerConsents, owners, ownerships } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import type { Actor } from "@/lib/vocabulary/actor";
import type { OwnerCorrection, OwnerMerge } from "./reference-schemas";

const WORDS = { name: "name", email: "e-mail address", town: "town", country: "country" } as const;

/** Corrects an owner's name, e-mail, town or country, with the reason; the event keeps what it was. */
export async function correctOwner(db: Db, input: OwnerCorrection, actor: Actor): Promise<{ name: string }> {
  return db.transaction(async (tx) => {
    const [before] = await tx.select().from(owners).where(eq(owners.id, input.ownerId)).limit(1);
    if (!before) throw new AppError(404, "That owner is not on record. Reload the page and choose them again.");
    if (before.mergedIntoId) throw new AppError(409, `${before.name}'s record was merged into another; correct that one instead.`);
    const after = { name: input.name, email: input.email, town: input.town, country: input.country };
    const changed = (Object.keys(WORDS) as (keyof typeof WORDS)[]).filter((k) => (before[k] ?? null) !== (after[k] ?? null));
    if (!changed.length) throw new AppError(400, `Nothing to correct: ${before.name}'s record is as it was.`);
    if (after.email && after.email !== before.email) {
      const [other] = await tx.select({ name: owners.name }).from(owners).where(and(sql`lower(${owners.email}) = ${after.email}`, isNull(owners.mergedIntoId), sql`${owners.id} <> ${before.id}`)).limit(1);
      if (other) throw new AppError(409, `Another owner record (${other.name}) has that e-mail address: merge the two records instead.`, { email: ["Another owner record has this address: merge the two instead."] });
    }
    await tx.update(owners).set(after).where(eq(owners.id, before.id));
    await appendEvent(tx, {
      actorId: actor.id,
      station: "admin",
      type: "owner.corrected",
      subjectKind: "owner",
      subjectId: before.id,
      data: { changed: changed.map((k) => WORDS[k]), from: Object.fromEntries(changed.map((k) => [k, before[k]])), to: Object.fromEntries(changed.map((k) => [k, after[k]])) },
      reason: input.reason,
    });
    return { name: after.name };
  });
}

/**
 * Merges the duplicate `mergeId` into `keepId`: each pair the duplicate owns and the survivor does
 * not is registered to the survivor from the same day and by the same route (so a warranty's start
 * does not move), the duplicate's newer word on contact is appended to the survivor's, and the
 * duplicate points at the survivor. Nothing earlier is changed or removed.
 */
export async function mergeOwners(db: Db, input: OwnerMerge, actor: Actor): Promise<{ kept: string; merged: string; pairs: number }> {
  return db.transaction(async (tx) => {
    const rows = await tx.select().from(owners).where(inArray(owners.id, [input.keepId, input.mergeId]));
    const keep = rows.find((r) => r.id === input.keepId);
    const dup = rows.find((r) => r.id === input.mergeId);
    if (!keep || !dup) throw new AppError(404, "One of those owners is not on record. Reload the page and choose them again.");
    if (keep.mergedIntoId) throw new AppError(409, `${keep.name}'s record was itself merged into another: keep that one instead.`, { keepId: ["This record was merged into another already."] });
    if (dup.mergedIntoId) throw new AppError(409, `${dup.name}'s record was merged already.`, { mergeId: ["This record was merged already."] });
    const at = now();
    const mergeEvent = await appendEvent(tx, {
      actorId: actor.id,
      station: "admin",
      type: "owner.merged",
      subjectKind: "owner",
      subjectId: keep.id,
      data: { kept: keep.id, merged: dup.id, mergedName: dup.name, mergedEmail: dup.email },
      reason: input.reason,
      at,
    });
    const held = await tx
      .select({ itemId: ownerships.itemId, since: ownerships.since, identity: items.identity, via: sql<string | null>`json_extract(${events.data}, '$.via')` })
      .from(ownerships)
      .innerJoin(items, eq(items.id, ownerships.itemId))
      .leftJoin(events, eq(events.id, ownerships.eventId))
      .where(eq(ownerships.ownerId, dup.id))
      .orderBy(asc(ownerships.id));
    const keptItems = new Set((await tx.select({ itemId: ownerships.itemId }).from(ownerships).where(eq(ownerships.ownerId, keep.id))).map((r) => r.itemId));
    let pairs = 0;
    for (const h of held) {
      if (keptItems.has(h.itemId)) continue;
      keptItems.add(h.itemId);
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station: "admin",
        type: "ownership.registered",
        subjectKind: "item",
        subjectId: h.itemId,
        // The registration's own route is kept: an intake at the desk still does not start a warranty.
        data: { identity: h.identity, ownerId: keep.id, newOwner: false, mergedFrom: dup.id, ...(h.via ? { via: h.via } : {}) },
        reason: input.reason,
        at,
      });
      await tx.insert(ownerships).values({ ownerId: keep.id, itemId: h.itemId, since: h.since, eventId });
      pairs++;
    }
    const newest = async (ownerId: string) => (await tx.select().from(ownerConsents).where(eq(ownerConsents.ownerId, ownerId)).orderBy(desc(ownerConsents.at), desc(ownerConsents.id)).limit(1))[0];
    const [dupConsent, keptConsent] = [await newest(dup.id), await newest(keep.id)];
    if (dupConsent && (!keptConsent || dupConsent.at.getTime() > keptConsent.at.getTime())) {
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station: "admin",
        type: "owner.consent_recorded",
        subjectKind: "owner",
        subjectId: keep.id,
        data: { consent: dupConsent.consent, mergedFrom: dup.id, givenAt: dupConsent.at.toISOString() },
        reason: input.reason,
        at,
      });
      await tx.insert(ownerConsents).values({ ownerId: keep.id, consent: dupConsent.consent, at, eventId });
    }
    await tx.update(owners).set({ mergedIntoId: keep.id }).where(eq(owners.id, dup.id));
    await appendEvent(tx, { actorId: actor.id, station: "admin", type: "owner.merged", subjectKind: "owner", subjectId: dup.id, data: { kept: keep.id, keptName: keep.name, merged: dup.id, mergeEventId: mergeEvent }, reason: input.reason, at });
    return { kept: keep.name, merged: dup.name, pairs };
  });
}

export interface OwnerListRow {
  id: string;
  name: string;
  email: string | null;
  town: string;
  country: string;
  createdAt: Date;
  pairs: number;
  mergedInto: string | null;
}

/** Every owner record with how many pairs it holds; merged records name their survivor. */
export async function ownersForAdmin(db: DbOrTx): Promise<OwnerListRow[]> {
  const [rows, held] = await Promise.all([
    db.select().from(owners).orderBy(asc(owners.name)),
    db.select({ ownerId: ownerships.ownerId, n: count() }).from(ownerships).groupBy(ownerships.ownerId),
  ]);
  const n = new Map(held.map((h) => [h.ownerId, Number(h.n)]));
  const names = new Map(rows.map((r) => [r.id, r.name]));
  return rows.map((r) => ({ id: r.id, name: r.name, email: r.email, town: r.town, country: r.country, createdAt: r.createdAt, pairs: n.get(r.id) ?? 0, mergedInto: r.mergedIntoId ? names.get(r.mergedIntoId) ?? "another record" : null }));
}
