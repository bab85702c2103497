/** Calendar dates as the workshop reads them: in its one time zone (TWINLEAF_TIME_ZONE, lib/workshop-time.ts). */
import { formatMonthYear } from "@/lib/format";
import { workshopDay } from "@/lib/workshop-time";

/** The calendar date of `d` as YYYY-MM-DD in the workshop's time zone. */
export const isoDay = (d: Date): string => workshopDay(d);

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
export const monthName = (d: Date): string => formatMonthYear(d);
