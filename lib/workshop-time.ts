/**
 * The workshop's one time zone, and the calendar read in it. Every date and time of day Twinleaf
 * shows, prints or derives (a day's end, a label's production date, "this year") is read in the
 * zone named by TWINLEAF_TIME_ZONE, an IANA name (default UTC), never in the server's own TZ, so
 * that a page, a refusal, a PDF and a label printed on one machine all say the same.
 *
 * No server or Node APIs: the route rules (which the browser also loads) use it. Words for people
 * are in lib/format.ts.
 */
import { TZDate } from "@date-fns/tz";
import { endOfDay } from "date-fns";

export const TIME_ZONE_SETTING = "TWINLEAF_TIME_ZONE";
export const DEFAULT_TIME_ZONE = "UTC";

/** An IANA name: "UTC", "Europe/London", "America/Argentina/Buenos_Aires", "Etc/GMT-2". */
const IANA_NAME = /^[A-Za-z][A-Za-z0-9_+-]*(\/[A-Za-z0-9_+-]+)*$/;

/**
 * The zone's canonical IANA name ("europe/london" → "Europe/London"), or an error that names the
 * setting. Offsets such as "+01:00" are refused: they know nothing of summer time.
 */
export function checkTimeZone(name: string): string {
  const given = name.trim();
  const refuse = () =>
    new Error(`${TIME_ZONE_SETTING} is "${name}", which is not a time zone: give an IANA time zone name such as Europe/London, America/Chicago or UTC.`);
  if (!IANA_NAME.test(given)) throw refuse();
  try {
    return new Intl.DateTimeFormat("en-GB", { timeZone: given }).resolvedOptions().timeZone;
  } catch {
    throw refuse();
  }
}

let cached: { raw: string | undefined; zone: string } | null = null;

/** The workshop's time zone, from TWINLEAF_TIME_ZONE (default UTC). Throws on an unknown zone. */
export function workshopTimeZone(): string {
  const raw = typeof process === "undefined" ? undefined : process.env[TIME_ZONE_SETTING];
  if (!cached || cached.raw !== raw) cached = { raw, zone: raw?.trim() ? checkTimeZone(raw) : DEFAULT_TIME_ZONE };
  return cached.zone;
}

/** `d` as a date in the workshop's zone (its getters read the workshop's wall clock). */
export function inWorkshopZone(d: Date): TZDate {
  return new TZDate(d.getTime(), workshopTimeZone());
}

/** The workshop's calendar date of `d`, as YYYY-MM-DD. */
export function workshopDay(d: Date): string {
  const t = inWorkshopZone(d);
  return `${String(t.getFullYear()).padStart(4, "0")}-${String(t.getMonth() + 1).padStart(2, "0")}-${String(t.getDate()).padStart(2, "0")}`;
}

/** The last millisecond of the workshop's day that holds `at` (a day may be 23 or 25 hours long). */
export function workshopDayEnd(at: Date): Date {
  return new Date(endOfDay(inWorkshopZone(at)).getTime());
}

/** Whether `a` and `b` fall in one calendar year of the workshop. */
export function sameWorkshopYear(a: Date, b: Date): boolean {
  return inWorkshopZone(a).getFullYear() === inWorkshopZone(b).getFullYear();
}

const MINUTE_MS = 60_000;

/**
 * The one rounding rule for "allowed from" times: a hold that releases at 06:22:31 is allowed from
 * 06:23:00. The route enforces this minute and every page and message shows it, so what the shop
 * reads is never earlier than what the rules allow.
 */
export function allowedFromMinute(release: Date): Date {
  return new Date(Math.ceil(release.getTime() / MINUTE_MS) * MINUTE_MS);
}
