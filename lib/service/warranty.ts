/**
 * Whether a returned speaker is in warranty, worked out so the desk can show each step. Pure:
 * calendar days in, calendar days out (YYYY-MM-DD); the query that gathers the facts is
 * lib/service/queries.ts `warrantyFacts`.
 */
import { addMonths, differenceInCalendarDays } from "date-fns";

export type WarrantyRule = "shipped" | "registered";

export interface WarrantyFacts {
  /** The day the pair left the workshop. */
  shippedOn: string;
  /** The day an owner first registered the pair, if one did. */
  registeredOn: string | null;
  /** The model's warranty period in months. */
  months: number;
  /** The day the speaker came back to the desk. */
  receivedOn: string;
}

export interface Warranty {
  rule: WarrantyRule;
  shippedOn: string;
  registeredOn: string | null;
  startsOn: string;
  months: number;
  /** The last day covered (start + the period in calendar months). */
  endsOn: string;
  receivedOn: string;
  inWarranty: boolean;
  /** Days from the day received to the last day covered; 0 when it came back on that day. */
  daysLeft: number | null;
  /** Days past the last day covered; null while in warranty. */
  daysOver: number | null;
}

const DAY = /^(\d{4})-(\d{2})-(\d{2})$/;

// A calendar day as a local date at noon: addMonths and day differences then work on the calendar
// alone, whatever the zone of the machine (noon keeps a summer-time shift from moving the day).
function toDate(day: string): Date {
  const m = DAY.exec(day);
  if (!m) throw new RangeError(`${day} is not a day written YYYY-MM-DD`);
  return new Date(Number(m[1]), Number(m[2]) - 1, Number(m[3]), 12);
}

function toDay(d: Date): string {
  return `${String(d.getFullYear()).padStart(4, "0")}-${String(d.getMonth() + 1).padStart(2, "0")}-${String(d.getDate()).padStart(2, "0")}`;
}

/**
 * The warranty starts on the ship date, or on the owner's registration date where that is later;
 * it ends the period's calendar months later (31 January + 1 month is 28 or 29 February, as
 * date-fns `addMonths` clips to the month's last day); the speaker is in warranty when it was
 * received on or before the last day covered.
 */
export function workOutWarranty(f: WarrantyFacts): Warranty {
  if (!Number.isInteger(f.months) || f.months < 0) throw new RangeError("a warranty period is a whole number of months, 0 or more");
  const rule: WarrantyRule = f.registeredOn !== null && f.registeredOn > f.shippedOn ? "registered" : "shipped";
  const startsOn = rule === "registered" ? f.registeredOn! : f.shippedOn;
  const endsOn = toDay(addMonths(toDate(startsOn), f.months));
  const gap = differenceInCalendarDays(toDate(endsOn), toDate(f.receivedOn));
  const inWarranty = gap >= 0;
  return {
    rule,
    shippedOn: f.shippedOn,
    registeredOn: f.registeredOn,
    startsOn,
    months: f.months,
    endsOn,
    receivedOn: f.receivedOn,
    inWarranty,
    daysLeft: inWarranty ? gap : null,
    daysOver: inWarranty ? null : -gap,
  };
}

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? "" : "s"}`;

/** The working as the desk reads it, one line per step (days written as the caller formats them). */
export function warrantyWorking(w: Warranty, day: (iso: string) => string): string[] {
  const start =
    w.rule === "registered"
      ? `Starts ${day(w.startsOn)}: the owner registered the pair after it shipped on ${day(w.shippedOn)}, and the later day counts.`
      : `Starts ${day(w.startsOn)}: the day the pair shipped${w.registeredOn ? ` (the owner registered it on ${day(w.registeredOn)}, not later)` : ""}.`;
  const period = `Period: ${plural(w.months, "month")}, so it covers up to and including ${day(w.endsOn)}.`;
  const verdict = w.inWarranty
    ? `Received ${day(w.receivedOn)}: in warranty, with ${plural(w.daysLeft!, "day")} left.`
    : `Received ${day(w.receivedOn)}: out of warranty, ${plural(w.daysOver!, "day")} over.`;
  return [start, period, verdict];
}
