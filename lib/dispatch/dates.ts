/** Calendar dates as the workshop reads them: in the server's time zone (TZ, default UTC), like lib/format.ts. */
const zone = () => process.env.TZ || "UTC";

/** The calendar date of `d` as YYYY-MM-DD in the workshop's time zone. */
export function isoDay(d: Date, timeZone = zone()): string {
  const parts = new Intl.DateTimeFormat("en-GB", { timeZone, year: "numeric", month: "2-digit", day: "2-digit" }).formatToParts(d);
  const part = (type: string) => parts.find((p) => p.type === type)?.value ?? "";
  return `${part("year")}-${part("month")}-${part("day")}`;
}

/** True for a real calendar date written YYYY-MM-DD (no 31 February). */
export function isCalendarDay(text: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(text);
  if (!m) return false;
  const d = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])));
  return d.getUTCFullYear() === Number(m[1]) && d.getUTCMonth() === Number(m[2]) - 1 && d.getUTCDate() === Number(m[3]);
}

/** Noon UTC of a YYYY-MM-DD day: read in UTC it is that day whatever the clock's time of day. */
export const noonUtc = (day: string) => new Date(`${day}T12:00:00Z`);

/** "November 2026": the month of `d` in the workshop's time zone. */
export function monthName(d: Date, timeZone = zone()): string {
  return new Intl.DateTimeFormat("en-GB", { timeZone, month: "long", year: "numeric" }).format(d);
}
