/**
 * Containment codes: "CN", the workshop's year and month as YYMM, and the month's sequence, e.g.
 * "CN2612-0003" is the third containment raised in December 2026. Pure.
 */
export const containmentPrefix = (workshopDay: string): string => `CN${workshopDay.slice(2, 4)}${workshopDay.slice(5, 7)}-`;

export const containmentCode = (workshopDay: string, seq: number): string => `${containmentPrefix(workshopDay)}${String(seq).padStart(4, "0")}`;

/** A typed code tidied for look-up ("cn2612-3" → "CN2612-0003"), or null when it cannot be one. */
export function normaliseContainmentCode(text: string): string | null {
  const m = /^CN(\d{4})-?(\d{1,9})$/.exec(text.trim().toUpperCase().replace(/\s+/g, ""));
  if (!m) return null;
  return `CN${m[1]}-${m[2]!.padStart(4, "0")}`;
}
