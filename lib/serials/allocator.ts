import "server-only";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { serialSequences } from "@/db/schema/genealogy";
import { formatSerial, type SerialParts } from "./format";

/**
 * Takes the next number of the (kind, year) sequence and returns the formatted serial. One
 * upsert statement reads and bumps the counter, so two writers can never draw the same number;
 * run it in the transaction that inserts the item, so a rolled-back insert gives its number back
 * (and the unique `identity` remains the last guard).
 */
export async function allocateSerial(tx: DbOrTx, { kind, code, year }: Omit<SerialParts, "seq">): Promise<string> {
  // Check the parts before taking a number, so a bad code does not burn one outside a transaction.
  formatSerial({ kind, code, year, seq: 1 });
  const rows = await tx
    .insert(serialSequences)
    .values({ kind, year, last: 1 })
    .onConflictDoUpdate({ target: [serialSequences.kind, serialSequences.year], set: { last: sql`${serialSequences.last} + 1` } })
    .returning({ last: serialSequences.last });
  const seq = rows[0]?.last;
  if (seq === undefined) throw new Error(`Serial: the ${kind} sequence for ${year} returned no number`);
  return formatSerial({ kind, code, year, seq });
}
