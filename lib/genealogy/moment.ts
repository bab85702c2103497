import { z } from "zod";
import { isCalendarDate } from "@/lib/input/dates";
import type { TraceMoment } from "./trace";

export const MOMENT_MESSAGE = "Use now, built, ever, a date such as 2025-06-30, or a time with its zone such as 2025-06-30T14:00:00Z.";

/** ISO 8601 date and time with a zone (Z or ±hh:mm), as zod reads it: no rolled-over days or hours. */
const instant = z.iso.datetime({ offset: true });

/** True for a moment written as the trace reads it; anything else is refused, never reinterpreted. */
export function isMoment(v: string): boolean {
  return ["now", "built", "ever"].includes(v) || isCalendarDate(v) || instant.safeParse(v).success;
}

/**
 * How a trace's moment is written in a URL: now, built (as shipped), ever (history), a calendar
 * date or an ISO date and time with its zone. JavaScript's Date would read "2025-02-30" as
 * 2 March and "-1" as 2001, so only these forms are taken.
 */
export const momentParam = z
  .string({ error: MOMENT_MESSAGE })
  .trim()
  .default("now")
  .refine(isMoment, { message: MOMENT_MESSAGE });

/**
 * Turns the URL form into a moment. "built" needs the item's shipping time; a date without a time
 * means the end of that day (UTC), so "as of 30 June" includes what happened on the 30th.
 */
export function resolveMoment(value: string, shipped: Date | null): { moment: TraceMoment; label: string; note?: string } {
  if (value === "now") return { moment: { mode: "now" }, label: "now" };
  if (value === "ever") return { moment: { mode: "ever" }, label: "everything it ever held" };
  if (value === "built") {
    if (!shipped) return { moment: { mode: "now" }, label: "now", note: "It has not shipped yet, so it is shown as it is now." };
    return { moment: { mode: "at", at: shipped }, label: `as built (shipped ${shipped.toISOString().slice(0, 10)})` };
  }
  if (!isMoment(value)) throw new RangeError(MOMENT_MESSAGE);
  const at = isCalendarDate(value) ? new Date(`${value}T23:59:59.999Z`) : new Date(value);
  return { moment: { mode: "at", at }, label: `as of ${at.toISOString().slice(0, 10)}` };
}
