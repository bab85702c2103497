/**
 * Numbers typed into forms and query strings, read strictly: what a person writes on the shop
 * floor, nothing JavaScript's Number() would also take ("0x10", "1e3", "Infinity", "+5", " 12 3").
 * One reader for whole numbers, one for measures, and a zod helper for each that every schema
 * uses. JSON bodies already carry numbers as numbers; these are for text.
 */
import { z } from "zod";

/** A whole number: decimal digits only (no sign, point, exponent or separator). */
const WHOLE = /^[0-9]+$/;

/**
 * A measure: an optional minus (or the typographic minus "−"), digits, and at most one decimal
 * point or comma ("137", "137.5", "137,5", "-0,15", ".5", "12."). No thousands separators.
 */
const MEASURE = /^-?(?:[0-9]+(?:[.,][0-9]*)?|[.,][0-9]+)$/;

/** Longer than any quantity Twinleaf asks for; a longer string is not read at all. */
const MAX_CHARS = 32;

/** `text` as a whole number, or null when it is anything else (or beyond exact integers). */
export function readWholeNumber(text: string): number | null {
  const t = text.trim();
  if (t.length > MAX_CHARS || !WHOLE.test(t)) return null;
  const n = Number(t);
  return Number.isSafeInteger(n) ? n : null;
}

/** `text` as a measure (a decimal comma is a point), or null when it is anything else. */
export function readMeasure(text: string): number | null {
  const t = text.trim().replace(/^\u2212/, "-");
  if (t.length > MAX_CHARS || !MEASURE.test(t)) return null;
  const n = Number(t.replace(",", "."));
  return Number.isFinite(n) ? n : null;
}

/**
 * Turns form text into a number for `schema`, or leaves it as it came so `schema` refuses it
 * with its own message. Blank (or absent) text becomes `empty` when one is given.
 */
function fromText(read: (text: string) => number | null, opts: { empty?: number | null }) {
  const hasEmpty = "empty" in opts;
  return (v: unknown) => {
    if (v === undefined) return hasEmpty ? opts.empty : undefined;
    if (typeof v !== "string") return v;
    if (v.trim() === "") return hasEmpty ? opts.empty : undefined;
    const n = read(v);
    return n === null ? v : n;
  };
}

/**
 * A whole number typed as text, checked by `schema` (give it the field's message:
 * `z.number({ error: "Give how many cabinets, as a whole number." }).int().min(2)…`).
 * `empty` is what blank or absent text means; without it, blank is missing.
 */
export const wholeNumber = <T extends z.ZodType>(schema: T, opts: { empty?: number | null } = {}) => z.preprocess(fromText(readWholeNumber, opts), schema);

/** A measure typed as text (decimal point or comma), checked by `schema`; `empty` as for wholeNumber. */
export const measure = <T extends z.ZodType>(schema: T, opts: { empty?: number | null } = {}) => z.preprocess(fromText(readMeasure, opts), schema);
