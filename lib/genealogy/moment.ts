import { z } from "zod";
import type { TraceMoment } from "./trace";

/** How a trace's moment is written in a URL: now, built (as shipped), ever (history) or a date. */
export const momentParam = z
  .string()
  .trim()
  .default("now")
  .refine((v) => ["now", "built", "ever"].includes(v) || !Number.isNaN(Date.parse(v)), {
    message: "Use now, built, ever, or a date such as 2025-06-30.",
  });

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
  const at = /^\d{4}-\d{2}-\d{2}$/.test(value) ? new Date(`${value}T23:59:59.999Z`) : new Date(value);
  return { moment: { mode: "at", at }, label: `as of ${at.toISOString().slice(0, 10)}` };
}
