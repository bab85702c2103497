/**
 * The service home's rules: a case's age in days and whether it is stale. Pure; the threshold
 * comes from TWINLEAF_SERVICE_STALE_DAYS (default 14), and a page may try another number.
 */
import { differenceInCalendarDays } from "date-fns";

export const DEFAULT_STALE_DAYS = 14;
export const MAX_STALE_DAYS = 3650;

/** A whole number of days from 1 to 3650, or null. */
export function parseStaleDays(text: string | null | undefined): number | null {
  const t = (text ?? "").trim();
  if (!/^\d{1,4}$/.test(t)) return null;
  const n = Number(t);
  return n >= 1 && n <= MAX_STALE_DAYS ? n : null;
}

/** The setting, or the default when unset or not a whole number of days (a bad setting is not fatal here). */
export function staleDaysSetting(env: string | undefined = process.env.TWINLEAF_SERVICE_STALE_DAYS): number {
  return parseStaleDays(env) ?? DEFAULT_STALE_DAYS;
}

const noon = (day: string) => new Date(Number(day.slice(0, 4)), Number(day.slice(5, 7)) - 1, Number(day.slice(8, 10)), 12);

/** Whole calendar days from the day received to today (both YYYY-MM-DD, the workshop's calendar). */
export const ageInDays = (receivedOn: string, today: string): number => differenceInCalendarDays(noon(today), noon(receivedOn));

/** Stale: open longer than the threshold. */
export const isStale = (age: number, staleDays: number): boolean => age > staleDays;
