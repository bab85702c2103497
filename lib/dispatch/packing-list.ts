import "server-only";
import { asc, eq, notExists, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { models, packingItems } from "@/db/schema";
import { packingListOfItem } from "@/lib/workshop/model-spec-of";

// Kept apart from the rest of lib/dispatch (labels, certificates, mail) so the seed can import it lightly.

export const sameLabel = (a: string, b: string) => a.trim().toLowerCase() === b.trim().toLowerCase();

/** Always first in every carton, in this order, whatever the model's own list says. */
export const FIXED_PACKING_ITEMS = ["Left speaker", "Right speaker", "Certificate"] as const;

/** A model's list until someone writes its own. */
export const DEFAULT_PACKING_LIST: readonly string[] = [...FIXED_PACKING_ITEMS, "Grilles (2)", "Owner's manual"];

/**
 * The model's packing list in order: the three fixed items first, then the model's own rows (a
 * fixed item written among them is not listed twice). A model without rows gets the default list.
 */
export async function packingList(db: DbOrTx, modelId: string): Promise<string[]> {
  const rows = await db.select({ label: packingItems.label }).from(packingItems).where(eq(packingItems.modelId, modelId)).orderBy(asc(packingItems.position));
  if (rows.length === 0) return [...DEFAULT_PACKING_LIST];
  return withFixedItems(rows.map((r) => r.label));
}

/** A list of a model's own lines as packed: the three fixed items first, then its lines (blank ones and a fixed item written among them left out). */
export function withFixedItems(lines: readonly string[]): string[] {
  const own = lines.map((l) => l.trim()).filter((l) => l !== "" && !FIXED_PACKING_ITEMS.some((f) => sameLabel(f, l)));
  return [...FIXED_PACKING_ITEMS, ...own];
}

/**
 * How a line goes into the carton: the two speakers by their serials, an accessory with a code by
 * scanning that code, everything else (the certificate, a manual) by a tick.
 */
export type PackingLineMode = "left" | "right" | "scan" | "tick";

export interface PackingLine {
  label: string;
  /** The accessory's GTIN or own code, for a "scan" line; null otherwise. */
  code: string | null;
  mode: PackingLineMode;
}

/**
 * A pair's packing list with how each line is checked in, in packing order: the lines of the model
 * version the pair was made under (lib/workshop/model-spec-of.ts), each accessory with the code the
 * model's current list gives it (a code names the accessory, not the version).
 */
export async function packingLines(db: DbOrTx, pair: { id: string; modelId: string | null }): Promise<PackingLine[]> {
  if (!pair.modelId) return [];
  const rows = await db.select({ label: packingItems.label, code: packingItems.code }).from(packingItems).where(eq(packingItems.modelId, pair.modelId)).orderBy(asc(packingItems.position));
  const codes = new Map(rows.filter((r) => r.code?.trim()).map((r) => [r.label.trim().toLowerCase(), r.code!.trim()]));
  return (await packingListOfItem(db, pair)).map((label) => {
    if (sameLabel(label, FIXED_PACKING_ITEMS[0])) return { label, code: null, mode: "left" };
    if (sameLabel(label, FIXED_PACKING_ITEMS[1])) return { label, code: null, mode: "right" };
    const code = FIXED_PACKING_ITEMS.some((f) => sameLabel(f, label)) ? undefined : codes.get(label.trim().toLowerCase());
    return code ? { label, code, mode: "scan" } : { label, code: null, mode: "tick" };
  });
}

/** Writes the default packing list for every model that has none yet; returns how many models got one. */
export async function ensurePackingLists(tx: DbOrTx): Promise<number> {
  const bare = await tx
    .select({ id: models.id })
    .from(models)
    .where(notExists(tx.select({ one: sql`1` }).from(packingItems).where(eq(packingItems.modelId, models.id))));
  for (const m of bare) {
    await tx.insert(packingItems).values(DEFAULT_PACKING_LIST.map((label, i) => ({ modelId: m.id, position: i + 1, label })));
  }
  return bare.length;
}

