/**
 * Dates and times as the workshop reads them: every page, message, PDF and label formats through
 * here, in the workshop's one time zone (TWINLEAF_TIME_ZONE, lib/workshop-time.ts). Dates and
 * times in tables show the year only when it is not the current year in that zone; documents that
 * last (certificates) always show it. Where times of day are shown, the zone's name is shown too:
 * inline in messages ("14:05 on 3 Dec (Europe/London)") or once on a page (`timesNote`).
 *
 * No server or Node APIs: the route rules, which the browser also loads, use it. "The current
 * year" is read from `now`; pages that read the workshop clock (lib/clock.ts) pass it.
 */
import { format } from "date-fns";
import { allowedFromMinute, inWorkshopZone, sameWorkshopYear, workshopTimeZone } from "./workshop-time";

/** The workshop's time zone as people read it: "Europe/London", "UTC". */
export const timeZoneName = (): string => workshopTimeZone();

/** "Times in Europe/London.": once on a page whose tables or lines show times of day. */
export const timesNote = (): string => `Times in ${timeZoneName()}.`;

const pattern = (d: Date, withYear: string, withoutYear: string, now: Date) => format(inWorkshopZone(d), sameWorkshopYear(d, now) ? withoutYear : withYear);

/** "1 Dec, 22:03" this year, "1 Dec 2025, 22:03" another: for tables. */
export const formatWhen = (d: Date, now: Date = new Date()) => pattern(d, "d MMM yyyy, HH:mm", "d MMM, HH:mm", now);

/** "1 Dec 2026, 22:03:17": where the second matters. */
export const formatWhenExact = (d: Date) => format(inWorkshopZone(d), "d MMM yyyy, HH:mm:ss");

/** "Tuesday, 1 December" this year, "Tuesday, 1 December 2025" another. */
export const formatDay = (d: Date, now: Date = new Date()) => pattern(d, "EEEE, d MMMM yyyy", "EEEE, d MMMM", now);

/** "16 Jul" this year, "16 Jul 2025" another: dates in tables. */
export const formatDate = (d: Date, now: Date = new Date()) => pattern(d, "d MMM yyyy", "d MMM", now);

/** "3 December 2026": a date on a document that is kept (always with its year). */
export const formatLongDate = (d: Date) => format(inWorkshopZone(d), "d MMMM yyyy");

/** "December 2026". */
export const formatMonthYear = (d: Date) => format(inWorkshopZone(d), "MMMM yyyy");

/** "06:23": a time of day alone, where the day is plain (e.g. under "today"). */
export const formatTimeOfDay = (d: Date) => format(inWorkshopZone(d), "HH:mm");

/**
 * A time for the shop floor: "14:05 on 3 Dec", with the year when it is not the year of `now`
 * ("14:05 on 3 Jan 2027") and, with `zone`, the zone's name ("14:05 on 3 Dec (Europe/London)").
 */
export function formatShopTime(d: Date, now: Date = new Date(), opts: { zone?: boolean } = {}): string {
  const text = pattern(d, "HH:mm 'on' d MMM yyyy", "HH:mm 'on' d MMM", now);
  return opts.zone ? `${text} (${timeZoneName()})` : text;
}

/**
 * When something held becomes allowed, rounded up to the minute by the one rule
 * (`allowedFromMinute`), with the zone's name: "06:23 on 5 Dec (Europe/London)". Lists on a page
 * that names the zone once (`timesNote`) may leave it out with `{ zone: false }`.
 */
export const formatAllowedFrom = (release: Date, now: Date = new Date(), opts: { zone?: boolean } = {}) => formatShopTime(allowedFromMinute(release), now, { zone: opts.zone ?? true });

/**
 * A calendar day stored as YYYY-MM-DD (a flitch received, a batch delivered, a shipment's day):
 * "16 Jul" this year, "16 Jul 2025" another. It names a day, not an instant, so no zone moves it.
 */
export function formatCalendarDay(iso: string, now: Date = new Date()): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(iso);
  if (!m) return iso;
  const day = new Date(Number(m[1]), Number(m[2]) - 1, Number(m[3]));
  return format(day, Number(m[1]) === Number(format(inWorkshopZone(now), "yyyy")) ? "d MMM" : "d MMM yyyy");
}
