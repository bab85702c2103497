/**
 * Finishes and dealers as the admin keeps them: add, edit, retire and restore, each change an
 * event with who, when and what changed. A code already inside serials (a flitch's species, a
 * shipment's dealer) cannot change.
 */
import "server-only";
import { and, count, eq, ne } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db";
import { dealers, finishes, items } from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { appendEvent } from "@/lib/events/queries";
import type { Actor } from "@/lib/vocabulary/actor";
import type { DealerInput, FinishInput } from "./reference-schemas";

const FINISH_WORDS = { code: "code", name: "name", kind: "kind", botanicalName: "botanical name", cut: "cut", colourRef: "colour reference", detail: "note" } as const;
const DEALER_WORDS = { code: "code", name: "name", address: "address", postcode: "postcode", city: "town", country: "country", email: "e-mail address" } as const;

function changes<T extends Record<string, unknown>>(before: T, after: T, words: Partial<Record<keyof T, string>>) {
  const changed: string[] = [];
  const from: Record<string, unknown> = {};
  const to: Record<string, unknown> = {};
  for (const k of Object.keys(words) as (keyof T)[]) {
    if (before[k] !== after[k]) {
      changed.push(words[k]!);
      from[k as string] = before[k];
      to[k as string] = after[k];
    }
  }
  return { changed, from, to };
}

/** Adds a finish, or saves an edit of one (`finishId`). */
export async function saveFinish(db: Db, input: FinishInput, actor: Actor): Promise<{ code: string; created: boolean }> {
  const values = { code: input.code, name: input.name, kind: input.kind, botanicalName: input.botanicalName, cut: input.cut, colourRef: input.colourRef, detail: input.detail };
  const taken = () => new AppError(409, `There is already a finish with the code ${input.code}.`, { code: [`${input.code} is taken by another finish: choose another code.`] });
  try {
    return await db.transaction(async (tx) => {
      const [clash] = await tx.select({ id: finishes.id }).from(finishes).where(input.finishId ? and(eq(finishes.code, input.code), ne(finishes.id, input.finishId)) : eq(finishes.code, input.code)).limit(1);
      if (clash) throw taken();
      if (!input.finishId) {
        const id = newId();
        await tx.insert(finishes).values({ id, ...values, active: true });
        await appendEvent(tx, { actorId: actor.id, station: "admin", type: "finish.created", subjectKind: "finish", subjectId: id, data: { ...values } });
        return { code: input.code, created: true };
      }
      const [before] = await tx.select().from(finishes).where(eq(finishes.id, input.finishId)).limit(1);
      if (!before) throw new AppError(404, "That finish is not in the register. Reload the page and choose it again.");
      const diff = changes(before as unknown as Record<string, unknown>, values, FINISH_WORDS);
      if (!diff.changed.length) throw new AppError(400, `Nothing to save: ${before.name} is as it was.`);
      if (diff.changed.includes("kind") || diff.changed.includes("code")) {
        const [used] = await tx.select({ n: count() }).from(items).where(eq(items.finishId, before.id));
        if (Number(used?.n ?? 0) > 0) {
          const field = diff.changed.includes("code") ? "code" : "kind";
          throw new AppError(409, `The ${field} of ${before.code} cannot change: ${used!.n} items already carry it.`, { [field]: [`${used!.n} items carry ${before.code}, so its ${field} stays.`] });
        }
      }
      await tx.update(finishes).set(values).where(eq(finishes.id, before.id));
      await appendEvent(tx, { actorId: actor.id, station: "admin", type: "finish.changed", subjectKind: "finish", subjectId: before.id, data: { code: input.code, ...diff } });
      return { code: input.code, created: false };
    });
  } catch (e) {
    if (isConstraintError(e, "UNIQUE")) throw taken();
    throw e;
  }
}

/** Adds a dealer, or saves an edit of one (`dealerId`). */
export async function saveDealer(db: Db, input: DealerInput, actor: Actor): Promise<{ code: string; created: boolean }> {
  const values = { code: input.code, name: input.name, address: input.address, postcode: input.postcode, city: input.city, country: input.country, email: input.email };
  const taken = () => new AppError(409, `There is already a dealer with the code ${input.code}.`, { code: [`${input.code} is taken by another dealer: choose another code.`] });
  try {
    return await db.transaction(async (tx) => {
      const [clash] = await tx.select({ id: dealers.id }).from(dealers).where(input.dealerId ? and(eq(dealers.code, input.code), ne(dealers.id, input.dealerId)) : eq(dealers.code, input.code)).limit(1);
      if (clash) throw taken();
      if (!input.dealerId) {
        const id = newId();
        await tx.insert(dealers).values({ id, ...values, active: true });
        await appendEvent(tx, { actorId: actor.id, station: "admin", type: "dealer.created", subjectKind: "dealer", subjectId: id, data: { ...values } });
        return { code: input.code, created: true };
      }
      const [before] = await tx.select().from(dealers).where(eq(dealers.id, input.dealerId)).limit(1);
      if (!before) throw new AppError(404, "That dealer is not in the register. Reload the page and choose it again.");
      const diff = changes(before as unknown as Record<string, unknown>, values, DEALER_WORDS);
      if (!diff.changed.length) throw new AppError(400, `Nothing to save: ${before.name} is as it was.`);
      if (diff.changed.includes("code")) {
        const [used] = await tx.select({ n: count() }).from(items).where(eq(items.dealerId, before.id));
        if (Number(used?.n ?? 0) > 0) throw new AppError(409, `The code of ${before.code} cannot change: ${used!.n} shipments already carry it.`, { code: [`${used!.n} shipments carry ${before.code}, so the code stays.`] });
      }
      await tx.update(dealers).set(values).where(eq(dealers.id, before.id));
      await appendEvent(tx, { actorId: actor.id, station: "admin", type: "dealer.changed", subjectKind: "dealer", subjectId: before.id, data: { code: input.code, ...diff } });
      return { code: input.code, created: false };
    });
  } catch (e) {
    if (isConstraintError(e, "UNIQUE")) throw taken();
    throw e;
  }
}

/** Retires a finish or a dealer from new work, or brings it back; its history stays. */
export async function setReferenceActive(db: Db, input: { kind: "finish" | "dealer"; id: string; active: boolean; reason: string }, actor: Actor): Promise<{ name: string }> {
  const table = input.kind === "finish" ? finishes : dealers;
  return db.transaction(async (tx) => {
    const [row] = await tx.select({ id: table.id, code: table.code, name: table.name, active: table.active }).from(table).where(eq(table.id, input.id)).limit(1);
    if (!row) throw new AppError(404, `That ${input.kind} is not in the register.`);
    if (row.active === input.active) throw new AppError(409, `${row.name} is already ${row.active ? "in use" : "retired"}.`);
    await tx.update(table).set({ active: input.active }).where(eq(table.id, row.id));
    const type = input.kind === "finish" ? (input.active ? "finish.restored" : "finish.retired") : input.active ? "dealer.restored" : "dealer.retired";
    await appendEvent(tx, { actorId: actor.id, station: "admin", type, subjectKind: input.kind, subjectId: row.id, data: { code: row.code }, reason: input.reason });
    return { name: row.name };
  });
}

/** Finishes and dealers with how many items carry each, for the admin's lists. */
export async function referenceUse(db: DbOrTx): Promise<{ finishes: Map<string, number>; dealers: Map<string, number> }> {
  const [f, d] = await Promise.all([
    db.select({ id: items.finishId, n: count() }).from(items).groupBy(items.finishId),
    db.select({ id: items.dealerId, n: count() }).from(items).groupBy(items.dealerId),
  ]);
  return { finishes: new Map(f.filter((r) => r.id).map((r) => [r.id!, Number(r.n)])), dealers: new Map(d.filter((r) => r.id).map((r) => [r.id!, Number(r.n)])) };
}
