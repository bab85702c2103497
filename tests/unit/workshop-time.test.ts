/**
 * The workshop's one time zone and the one formatter. Offsets and summer-time dates are those of
 * the IANA time zone database: Europe/London is GMT (UTC+0) in winter and BST (UTC+1) from 01:00
 * UTC on the last Sunday of March to 01:00 UTC on the last Sunday of October (29 March and
 * 25 October in 2026); Europe/Berlin is UTC+1 in winter; America/New_York is UTC−5 in winter;
 * Pacific/Auckland is UTC+13 in the southern summer (NZDT).
 */
import { afterEach, describe, expect, test, vi } from "vitest";
import { formatAllowedFrom, formatCalendarDay, formatDate, formatDay, formatLongDate, formatMonthYear, formatShopTime, formatTimeOfDay, formatWhen, formatWhenExact, timesNote } from "@/lib/format";
import { isoDay, monthName } from "@/lib/dispatch/dates";
import { cartonElementString } from "@/lib/serials/gs1";
import { allowedFromMinute, checkTimeZone, workshopDay, workshopDayEnd, workshopTimeZone } from "@/lib/workshop-time";

const zone = (name: string | undefined) => vi.stubEnv("TWINLEAF_TIME_ZONE", name);
afterEach(() => {
  vi.unstubAllEnvs();
});

describe("the setting", () => {
  test.each([
    ["UTC", "UTC"],
    ["Europe/London", "Europe/London"],
    // ICU canonicalises case and the UTC aliases (IANA "backward" file: Etc/UTC and GMT link to UTC).
    ["europe/london", "Europe/London"],
    ["Etc/UTC", "UTC"],
    [" America/New_York ", "America/New_York"],
  ])("%j is the zone %j", (given, name) => {
    expect(checkTimeZone(given)).toBe(name);
  });

  test.each([["Mars/Olympus_Mons"], ["+01:00"], ["CEST now"], [""], ["../etc/passwd"]])("%j is refused with a message naming the setting", (given) => {
    expect(() => checkTimeZone(given)).toThrow(/^TWINLEAF_TIME_ZONE is ".*", which is not a time zone: give an IANA time zone name such as Europe\/London/);
  });

  test("unset or blank is UTC; set, it is read at the next call; unknown, it throws", () => {
    zone(undefined);
    expect(workshopTimeZone()).toBe("UTC");
    zone("  ");
    expect(workshopTimeZone()).toBe("UTC");
    zone("Europe/Berlin");
    expect(workshopTimeZone()).toBe("Europe/Berlin");
    expect(timesNote()).toBe("Times in Europe/Berlin.");
    zone("Nowhere/Special");
    expect(() => workshopTimeZone()).toThrow(/TWINLEAF_TIME_ZONE is "Nowhere\/Special"/);
  });
});

describe("the one rounding rule for allowed-from times", () => {
  test.each([
    ["2026-12-05T06:22:31.000Z", "2026-12-05T06:23:00.000Z", "a release inside a minute: the next whole minute"],
    ["2026-12-05T06:22:00.001Z", "2026-12-05T06:23:00.000Z", "a millisecond past the minute counts"],
    ["2026-12-05T06:22:00.000Z", "2026-12-05T06:22:00.000Z", "a whole minute stays"],
    ["2026-12-31T23:59:30.000Z", "2027-01-01T00:00:00.000Z", "across midnight and the year"],
  ])("%s → %s (%s)", (release, allowed) => {
    expect(allowedFromMinute(new Date(release)).toISOString()).toBe(allowed);
    expect(formatAllowedFrom(new Date(release), new Date(release))).toBe(formatShopTime(new Date(allowed), new Date(release), { zone: true }));
  });
});

describe("formatting in the workshop's zone, the year only when it is not this year", () => {
  const now = new Date("2026-12-05T10:00:00Z");
  test.each([
    // [zone, instant, formatWhen, formatDate, formatDay, formatShopTime with zone]
    ["UTC", "2026-12-03T14:05:00Z", "3 Dec, 14:05", "3 Dec", "Thursday, 3 December", "14:05 on 3 Dec (UTC)"],
    ["UTC", "2025-12-03T14:05:00Z", "3 Dec 2025, 14:05", "3 Dec 2025", "Wednesday, 3 December 2025", "14:05 on 3 Dec 2025 (UTC)"],
    ["Europe/London", "2026-07-16T06:22:00Z", "16 Jul, 07:22", "16 Jul", "Thursday, 16 July", "07:22 on 16 Jul (Europe/London)"],
    ["Europe/London", "2026-12-03T06:22:00Z", "3 Dec, 06:22", "3 Dec", "Thursday, 3 December", "06:22 on 3 Dec (Europe/London)"],
    ["America/New_York", "2026-12-04T02:30:00Z", "3 Dec, 21:30", "3 Dec", "Thursday, 3 December", "21:30 on 3 Dec (America/New_York)"],
    ["Pacific/Auckland", "2026-03-05T23:30:00Z", "6 Mar, 12:30", "6 Mar", "Friday, 6 March", "12:30 on 6 Mar (Pacific/Auckland)"],
  ])("%s: %s", (name, instant, when, date, day, shop) => {
    zone(name);
    const d = new Date(instant);
    expect(formatWhen(d, now)).toBe(when);
    expect(formatDate(d, now)).toBe(date);
    expect(formatDay(d, now)).toBe(day);
    expect(formatShopTime(d, now, { zone: true })).toBe(shop);
  });

  test("this year is the workshop's: 23:30 UTC on 31 December is already next year in Berlin", () => {
    const d = new Date("2026-12-31T23:30:00Z");
    const newYearBerlin = new Date("2026-12-31T23:45:00Z");
    zone("UTC");
    expect(formatDate(d, newYearBerlin)).toBe("31 Dec");
    zone("Europe/Berlin");
    expect(formatDate(d, newYearBerlin)).toBe("1 Jan");
    expect(formatDate(d, new Date("2026-12-31T12:00:00Z"))).toBe("1 Jan 2027");
  });

  test("documents and exact times always carry the year", () => {
    zone("Europe/London");
    const d = new Date("2026-07-16T23:30:15Z");
    expect(formatLongDate(d)).toBe("17 July 2026");
    expect(formatMonthYear(d)).toBe("July 2026");
    expect(formatWhenExact(d)).toBe("17 Jul 2026, 00:30:15");
    expect(formatTimeOfDay(d)).toBe("00:30");
    expect(monthName(d)).toBe("July 2026");
  });
});

describe("the workshop's calendar day", () => {
  test.each([
    ["UTC", "2026-12-05T10:00:00Z", "2026-12-05", "2026-12-05T23:59:59.999Z"],
    // Winter: London is on UTC, Berlin an hour ahead, New York five hours behind.
    ["Europe/London", "2026-12-05T10:00:00Z", "2026-12-05", "2026-12-05T23:59:59.999Z"],
    ["Europe/Berlin", "2026-12-05T23:30:00Z", "2026-12-06", "2026-12-06T22:59:59.999Z"],
    ["America/New_York", "2026-12-05T03:00:00Z", "2026-12-04", "2026-12-05T04:59:59.999Z"],
    // Summer time: the day ends at 23:00 UTC in London.
    ["Europe/London", "2026-07-16T12:00:00Z", "2026-07-16", "2026-07-16T22:59:59.999Z"],
    // The day the clocks go forward (23 hours) and back (25 hours) in London.
    ["Europe/London", "2026-03-29T00:30:00Z", "2026-03-29", "2026-03-29T22:59:59.999Z"],
    ["Europe/London", "2026-10-25T00:30:00Z", "2026-10-25", "2026-10-25T23:59:59.999Z"],
  ])("%s at %s: day %s, ends %s", (name, instant, day, end) => {
    zone(name);
    expect(workshopDay(new Date(instant))).toBe(day);
    expect(isoDay(new Date(instant))).toBe(day);
    expect(workshopDayEnd(new Date(instant)).toISOString()).toBe(end);
  });

  test.each([
    ["UTC", "260305"],
    ["Pacific/Auckland", "260306"],
    ["America/New_York", "260305"],
  ])("a carton label's (11) date is the workshop's calendar date in %s", (name, yymmdd) => {
    zone(name);
    const out = cartonElementString({ gtin: "09521234543213", serial: "A1", productionDate: new Date("2026-03-05T23:30:00Z") });
    expect(out.hri).toContain(`(11)${yymmdd}`);
  });
});

describe("a stored calendar day is the same day in every zone", () => {
  // A day is not an instant: "2026-07-16" is 16 July whether the workshop is at UTC−10 or UTC+13.
  test.each([
    ["UTC", "2026-07-16", "2026-12-05T12:00:00Z", "16 Jul"],
    ["Pacific/Auckland", "2026-07-16", "2026-12-05T12:00:00Z", "16 Jul"],
    ["Pacific/Tongatapu", "2026-07-16", "2026-12-05T12:00:00Z", "16 Jul"],
    ["Pacific/Honolulu", "2025-07-16", "2026-12-05T12:00:00Z", "16 Jul 2025"],
    ["UTC", "not a day", "2026-12-05T12:00:00Z", "not a day"],
  ])("in %s, %s (now %s) reads %s", (name, iso, now, words) => {
    zone(name);
    expect(formatCalendarDay(iso, new Date(now))).toBe(words);
  });
});
