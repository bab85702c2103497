/** Dates and times as the workshop reads them, in the server's time zone (TZ, default UTC). */
const zone = () => process.env.TZ || "UTC";

const short = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", hour: "2-digit", minute: "2-digit", timeZone: zone() });
const full = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeStyle: "medium", timeZone: zone() });
const day = new Intl.DateTimeFormat("en-GB", { weekday: "long", day: "numeric", month: "long", year: "numeric", timeZone: zone() });

/** "1 Dec, 22:03": for tables. */
export const formatWhen = (d: Date) => short.format(d);
/** "1 Dec 2026, 22:03:17": where the second matters. */
export const formatWhenExact = (d: Date) => full.format(d);
/** "Tuesday, 1 December 2026". */
export const formatDay = (d: Date) => day.format(d);

const date = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", year: "numeric", timeZone: zone() });
/** "16 Jul 2025": dates in tables. */
export const formatDate = (d: Date) => date.format(d);
