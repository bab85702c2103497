/**
 * The desk's case codes: "RT" (returned), the workshop's year and month as YYMM, and the month's
 * sequence, e.g. "RT2612-0007" is the seventh case opened in December 2026. Pure.
 */
export const CASE_CODE = /^RT(\d{2})(\d{2})-(\d{4,})$/;

/** The code's month prefix for a workshop day YYYY-MM-DD: "2026-12-05" → "RT2612-". */
export const casePrefix = (workshopDay: string): string => `RT${workshopDay.slice(2, 4)}${workshopDay.slice(5, 7)}-`;

/** The code of the `seq`th case of the month. */
export const caseCode = (workshopDay: string, seq: number): string => `${casePrefix(workshopDay)}${String(seq).padStart(4, "0")}`;

/** A typed code tidied for look-up ("rt2612-7" → "RT2612-0007"), or null when it cannot be one. */
export function normaliseCaseCode(text: string): string | null {
  const m = /^RT(\d{4})-?(\d{1,9})$/.exec(text.trim().toUpperCase().replace(/\s+/g, ""));
  if (!m) return null;
  return `RT${m[1]}-${m[2]!.padStart(4, "0")}`;
}
