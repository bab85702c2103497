/** Owners of pairs and their ownerships: who holds a shipped pair, from when. */
import "server-only";
import { and, eq, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { items, owners, ownerships } from "@/db/schema";
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
 * Registers `owner` as holding the pair from now, in one transaction: the owner is found by
 * e-mail (or registered when new), the ownership appended with its "ownership.registered" event.
 * Only a pair that has shipped has an owner; the same owner is not registered twice for one pair.
 */
export async function registerOwnership(db: DbOrTx, input: { pairId: string; owner: OwnerDetails }, actor: Actor): Promise<{ ownerId: string; newOwner: boolean }> {
  const owner = { name: oneLine(input.owner.name), email: input.owner.email ? input.owner.email.trim().toLowerCase() : null, town: oneLine(input.owner.town), country: input.owner.country.trim().toUpperCase() };
  const errors: Record<string, string[]> = {};
  if (!owner.name) errors.name = ["Give the owner's name."];
  if (!owner.town) errors.town = ["Give the owner's town."];
  if (!/^[A-Z]{2}$/.test(owner.country)) errors.country = ["Give the country as two letters, e.g. GB."];
  if (owner.email !== null && (owner.email.length > 254 || !/^[^\s@]+@[^\s@]+$/.test(owner.email))) errors.email = ["Give an e-mail address like name@example.com, or none."];
  if (Object.keys(errors).length) throw new AppError(400, `Nothing was saved: ${Object.values(errors)[0]![0]}`, errors);

  return db.transaction(async (tx) => {
    const [pair] = await tx.select().from(items).where(and(eq(items.id, input.pairId), eq(items.kind, "pair"))).limit(1);
    if (!pair) throw new AppError(404, "That pair is not in the register.");
    if (pair.state !== "shipped") throw new AppError(409, `${pair.identity} has not shipped yet: a pair has an owner once it has left the workshop.`);
    const at = now();
    const [known] = owner.email ? await tx.select({ id: owners.id }).from(owners).where(sql`lower(${owners.email}) = ${owner.email}`).limit(1) : [];
    let ownerId = known?.id;
    if (ownerId) {
      const [already] = await tx.select({ id: ownerships.id }).from(ownerships).where(and(eq(ownerships.ownerId, ownerId), eq(ownerships.itemId, pair.id))).limit(1);
      if (already) throw new AppError(409, `${owner.name} is already registered as an owner of ${pair.identity}.`);
    } else {
      ownerId = newId();
      await tx.insert(owners).values({ id: ownerId, ...owner, createdAt: at });
    }
    const eventId = await appendEvent(tx, {
      actorId: actor.id,
      station: "service",
      type: "ownership.registered",
      subjectKind: "item",
      subjectId: pair.id,
      // The owner's particulars stay in their record; the log names them by id.
      data: { identity: pair.identity, ownerId, newOwner: !known },
    });
    await tx.insert(ownerships).values({ ownerId, itemId: pair.id, since: at, eventId });
    return { ownerId, newOwner: !known };
  });
}
