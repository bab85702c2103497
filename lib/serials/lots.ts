/**
 * Identities of the register's source items that are not serialised: a drive-unit batch is named
 * by Twinleaf's batch code ("TW-2612-01": part-type code, year and month received, number in that
 * month), and a maker's lot by the maker and the maker's own lot code ("Nordkone lot L-2502"), since
 * two makers may use the same lot code.
 */
import { PART_TYPE_CODES, type PartType } from "./format";

const DAY = /^(\d{4})-(\d{2})-(\d{2})$/;

/** The batch code for the `n`-th batch of a part type received in the month of `receivedOn` (YYYY-MM-DD). */
export function batchCode(partType: PartType, receivedOn: string, n: number): string {
  const m = DAY.exec(receivedOn);
  if (!m) throw new Error(`Batch code: "${receivedOn}" is not a date (YYYY-MM-DD)`);
  if (!Number.isInteger(n) || n < 1 || n > 999) throw new Error(`Batch code: number ${n} must be 1–999`);
  return `${PART_TYPE_CODES[partType]}-${m[1]!.slice(2)}${m[2]}-${String(n).padStart(2, "0")}`;
}

/** Ends trimmed, as the lab's form stores makers and lots (and as the migration reads them). */
const tidy = (s: string) => s.trim();

/** The identity of a maker's lot item. Migration 0034 builds the same text in SQL (trimmed values). */
export function makerLotIdentity(maker: string, lot: string): string {
  const m = tidy(maker);
  const l = tidy(lot);
  if (!m || !l) throw new Error("Maker's lot: both the maker and the lot are needed");
  return `${m} lot ${l}`;
}
