/**
 * A lot reading (a text reading marked `lot`, such as a coat's lacquer lot) made traceable: the
 * lot is a supplier lot in the register (kind supplier_lot, a shared kind like a component lot),
 * fitted into each cabinet that took it at "LACQ-<coat>". So the forward trace of the lot, and a
 * containment raised on it, reach every cabinet and pair that was lacquered from it.
 *
 * The reading keeps the lot as it was written; the register's lot is its identity in capitals, so
 * "gl-2611-b" and "GL-2611-B" are one lot.
 */
import "server-only";
import type { DbOrTx } from "@/db";
import type { Item } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { createItem, fit, itemByIdentity, removeFrom, type Recorder } from "@/lib/genealogy/graph";
import { KIND_WORD, isItemKind } from "@/lib/vocabulary/item-kinds";
import type { ReadingValue, StepSpec } from "./types";

/** The lot's identity in the register: the code as written, in capitals. */
export const lotIdentity = (written: string) => written.trim().toUpperCase();

/** Where a lot sits in a cabinet: "LACQ-3" for coat 3 (the step's coat number, or its place in the route). */
export function lotPosition(step: StepSpec): string {
  const coat = step.readings.find((r) => r.key === "coat" && r.equals !== undefined)?.equals;
  return `LACQ-${coat ?? step.seq}`;
}

/** The lot readings of a step with the values given, as register identities. */
function lotsOf(step: StepSpec, values: Record<string, ReadingValue>): { key: string; identity: string }[] {
  return step.readings.filter((r) => r.kind === "text" && r.lot).flatMap((r) => (typeof values[r.key] === "string" && values[r.key] ? [{ key: r.key, identity: lotIdentity(values[r.key] as string) }] : []));
}

/**
 * Refuses, before anything is written, a lot code that the register already holds as something
 * else (a cabinet's serial typed into the lot field), beside its field.
 */
export async function checkLots(db: DbOrTx, step: StepSpec, values: Record<string, ReadingValue>): Promise<void> {
  const errors: Record<string, string[]> = {};
  for (const { key, identity } of lotsOf(step, values)) {
    const existing = await itemByIdentity(db, identity);
    if (existing && existing.kind !== "supplier_lot") {
      errors[key] = [`${identity} is ${isItemKind(existing.kind) ? `a ${KIND_WORD[existing.kind]}` : "another thing"} in the register, not a lot. Type the lot printed on the tin or drum.`];
    }
  }
  if (Object.keys(errors).length) throw new AppError(400, "Some readings need attention.", errors);
}

async function lotItem(tx: DbOrTx, identity: string, by: Recorder): Promise<Item> {
  const existing = await itemByIdentity(tx, identity);
  if (existing) return existing;
  return createItem(tx, { kind: "supplier_lot", identity, state: "in_stock", attrs: { material: "lacquer" } }, by);
}

/** Fits each lot the step recorded into each of its cabinets. Call inside the step's transaction, after checkLots. */
export async function fitLots(tx: DbOrTx, step: StepSpec, values: Record<string, ReadingValue>, cabinets: Item[], by: Recorder): Promise<void> {
  for (const { identity } of lotsOf(step, values)) {
    const lot = await lotItem(tx, identity, by);
    for (const cabinet of cabinets) await fit(tx, { parent: cabinet, child: lot, position: lotPosition(step) }, by);
  }
}

/**
 * After a correction: a lot that changed is taken out of the cabinets (the mistyped one never went
 * in) and the corrected one fitted, so the trace follows the corrected reading.
 */
export async function refitLots(tx: DbOrTx, step: StepSpec, before: Record<string, ReadingValue>, after: Record<string, ReadingValue>, cabinets: Item[], by: Recorder & { reason: string }): Promise<void> {
  const was = lotsOf(step, before);
  const is = lotsOf(step, after);
  for (const old of was) {
    const now = is.find((l) => l.key === old.key);
    if (now?.identity === old.identity) continue;
    const lot = await itemByIdentity(tx, old.identity);
    if (lot) {
      for (const cabinet of cabinets) {
        await removeFrom(tx, { parent: cabinet, child: lot, data: { position: lotPosition(step) } }, { ...by, reason: `lot corrected: ${by.reason}` }).catch((e: unknown) => {
          // Not fitted (a record made before lots were traced): nothing to take out.
          if (!(e instanceof AppError && e.status === 409)) throw e;
        });
      }
    }
  }
  const changed = is.filter((l) => was.find((w) => w.key === l.key)?.identity !== l.identity);
  if (!changed.length) return;
  const values = Object.fromEntries(changed.map((l) => [l.key, l.identity]));
  await fitLots(tx, step, values, cabinets, by);
}
