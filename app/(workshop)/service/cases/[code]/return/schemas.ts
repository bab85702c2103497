import { z } from "zod";
import { calendarDate } from "@/lib/input/dates";

/**
 * The return form. Only shapes and sizes here; the case's state, the owner or dealer on record
 * and the day against the case's dates are checked by lib/service/return.ts, under the same fields.
 */
export const returnSchema = z.object({
  code: z.string().trim().min(3, "The case is missing.").max(40),
  to: z.enum(["owner", "dealer"], { error: "Choose whether it goes back to the owner or to the dealer." }),
  shippedOn: calendarDate("Give the day it left, as YYYY-MM-DD."),
  carrier: z.string({ error: "Name the carrier." }).trim().min(1, "Name the carrier.").max(80, "At most 80 characters."),
  tracking: z.string({ error: "Give the carrier's tracking number." }).trim().min(1, "Give the carrier's tracking number.").max(80, "At most 80 characters."),
});
