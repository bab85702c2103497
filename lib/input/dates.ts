/**
 * Calendar dates typed into forms, query strings and JSON: YYYY-MM-DD and a day that is on the
 * calendar (no 30 February, 29 February only in leap years). Refused rather than rolled over, as
 * JavaScript's Date would ("2025-02-30" → 2 March). zod's ISO date check holds the calendar rule.
 */
import { z } from "zod";

export const DATE_SHAPE_MESSAGE = "Give the date as YYYY-MM-DD, such as 2025-06-30.";

const SHAPE = /^[0-9]{4}-[0-9]{2}-[0-9]{2}$/;
const calendar = z.iso.date();

/** True for a real calendar day written YYYY-MM-DD. */
export function isCalendarDate(text: string): boolean {
  return SHAPE.test(text) && calendar.safeParse(text).success;
}

/**
 * A date field: trimmed text, YYYY-MM-DD, a day on the calendar. `message` replaces the shape
 * message; a well-shaped day that does not exist is named ("2025-02-30 is not a day on the calendar.").
 */
export const calendarDate = (message: string = DATE_SHAPE_MESSAGE) =>
  z
    .string({ error: message })
    .trim()
    .superRefine((text, ctx) => {
      if (!SHAPE.test(text)) ctx.addIssue({ code: "custom", message });
      else if (!calendar.safeParse(text).success) ctx.addIssue({ code: "custom", message: `${text} is not a day on the calendar.` });
    });
