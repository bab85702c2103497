/**
 * GS1 check digits and the element string a carton label carries: (01) GTIN, (11) production
 * date, (21) serial and optionally (10) lot. Rules from the GS1 General Specifications.
 */
import { TZDate } from "@date-fns/tz";
import { inWorkshopZone } from "@/lib/workshop-time";

/**
 * Mod-10 check digit of the data digits (everything but the check digit): weights 3, 1, 3, …
 * from the rightmost data digit; check = (10 − sum mod 10) mod 10. Serves GTIN-8/12/13/14 and SSCC.
 */
export function gs1CheckDigit(digits: string): number {
  if (!/^[0-9]+$/.test(digits)) throw new Error(`GS1 check digit: expected digits only, got "${digits}"`);
  let sum = 0;
  for (let i = 0; i < digits.length; i++) {
    const digit = digits.charCodeAt(digits.length - 1 - i) - 48;
    sum += digit * (i % 2 === 0 ? 3 : 1);
  }
  return (10 - (sum % 10)) % 10;
}

/** A GTIN-8, -12, -13 or -14 whose last digit is its check digit. */
export function isValidGtin(gtin: string): boolean {
  return /^(?:[0-9]{8}|[0-9]{12,14})$/.test(gtin) && gs1CheckDigit(gtin.slice(0, -1)) === Number(gtin.slice(-1));
}

/** GS1 AI encodable character set 82 (GS1 General Specifications, character sets). */
const CSET82 = /^[!"%&'()*+,\-./0-9:;<=>?A-Z_a-z]*$/;

/** The ASCII group separator a scanner transmits for FNC1 between element strings. */
export const GS = "\u001d";

export interface CartonElementInput {
  /** GTIN-14 of the packed pair, check digit included. */
  gtin: string;
  /** The carton's serial, usually the register's K-… serial. */
  serial: string;
  /** Printed as YYMMDD: its calendar date in `timeZone`. Left out, the string carries no (11). */
  productionDate?: Date;
  lot?: string;
  /** The calendar the date is read in; defaults to the workshop's (TWINLEAF_TIME_ZONE, lib/workshop-time.ts). */
  timeZone?: string;
}

export interface CartonElementString {
  /** Human-readable interpretation printed under the bars: `(01)…(11)…(21)…(10)…`. */
  hri: string;
  /** The bracketed text bwip-js's `gs1-128` encoder reads. */
  bwipText: string;
  /** What a scanner transmits after the symbology identifier ]C1: FNC1 as GS, only where needed. */
  raw: string;
}

interface Element {
  ai: string;
  value: string;
  /** On GS1's list of predefined-length AIs (01 and 11 are): no FNC1 needed after it. */
  fixed: boolean;
}

export function cartonElementString(input: CartonElementInput): CartonElementString {
  const { gtin, serial, productionDate, lot } = input;
  if (!/^[0-9]{14}$/.test(gtin)) throw new Error(`GS1 (01): the GTIN must be 14 digits, got "${gtin}"`);
  if (!isValidGtin(gtin)) {
    throw new Error(`GS1 (01): "${gtin}" has check digit ${gtin[13]}, but its data digits need ${gs1CheckDigit(gtin.slice(0, 13))}`);
  }
  checkCset82("(21) serial", serial);
  if (lot !== undefined) checkCset82("(10) lot", lot);

  // Fixed-length elements first, so the only separators are between variable-length ones.
  const elements: Element[] = [
    { ai: "01", value: gtin, fixed: true },
    ...(productionDate ? [{ ai: "11", value: yymmdd(productionDate, input.timeZone), fixed: true }] : []),
    { ai: "21", value: serial, fixed: false },
    ...(lot !== undefined ? [{ ai: "10", value: lot, fixed: false }] : []),
  ];
  const hri = elements.map((e) => `(${e.ai})${e.value}`).join("");
  // GS1 General Specifications, concatenation: FNC1 follows a variable-length element string
  // unless it is the last one in the symbol.
  const raw = elements
    .map((e, i) => `${e.ai}${e.value}${!e.fixed && i < elements.length - 1 ? GS : ""}`)
    .join("");
  return { hri, bwipText: hri, raw };
}

function checkCset82(label: string, value: string): void {
  if (value.length < 1 || value.length > 20) {
    throw new Error(`GS1 ${label}: must be 1 to 20 characters, got ${value.length} ("${value}")`);
  }
  if (!CSET82.test(value)) {
    const bad = [...value].filter((ch) => !CSET82.test(ch));
    throw new Error(`GS1 ${label}: "${value}" holds characters outside GS1 CSET 82: ${bad.map((c) => JSON.stringify(c)).join(" ")}`);
  }
  // CSET 82 allows parentheses, but bwip-js reads "(" and ")" as AI brackets, so the label text
  // would encode different data: refuse rather than print a wrong barcode.
  if (/[()]/.test(value)) throw new Error(`GS1 ${label}: "${value}" holds a parenthesis, which the bracketed label text cannot carry`);
}

/** GS1 AI (11) date, YYMMDD, of the calendar date of `date` in `timeZone` (default the workshop's). */
function yymmdd(date: Date, timeZone?: string): string {
  if (Number.isNaN(date.getTime())) throw new Error("GS1 (11): the production date is not a valid date");
  const t = timeZone ? new TZDate(date.getTime(), timeZone) : inWorkshopZone(date);
  const two = (n: number) => String(n).padStart(2, "0");
  return two(t.getFullYear() % 100) + two(t.getMonth() + 1) + two(t.getDate());
}
