import { z } from "zod";
import { calendarDate } from "@/lib/input/dates";
import { stringList } from "@/lib/forms";

/**
 * Shared by the dispatch forms and their actions. Only shapes and sizes are checked here; what
 * the values mean (the packing list, carton states, dates in the future) is checked by
 * lib/dispatch, which answers under the same field names.
 */
const serial = (message: string) => z.string({ error: message }).trim().min(1, message).max(60, "A serial is at most 60 characters.");

import { LOCATION_HINT } from "./words";
export { LOCATION_HINT };

const location = z
  .string({ error: LOCATION_HINT })
  .trim()
  .min(1, "Say where the carton is stored, e.g. Rack B, shelf 2.")
  .max(60, "The storage location is at most 60 characters.");

/** A scanned box: empty is allowed here, so lib/dispatch can say beside the field what is missing. */
const scanned = z.string().trim().max(80, "A scan is at most 80 characters.");

export const packSchema = z.object({
  pair: serial("The pair's serial did not come through; reload the page."),
  left: scanned.default(""),
  right: scanned.default(""),
  scan: stringList(scanned).pipe(z.array(z.string()).max(40, "The packing list did not come through; reload the page.")),
  checked: stringList(z.string().max(100)).pipe(z.array(z.string()).max(40, "The packing list did not come through; reload the page.")),
  location,
});

export const moveSchema = z.object({
  carton: serial("Choose the carton that moved."),
  location,
});

export const shipSchema = z.object({
  dealerId: z.string({ error: "Choose the dealer the cartons go to." }).trim().min(1, "Choose the dealer the cartons go to."),
  cartons: stringList(z.string().trim().max(60)).pipe(z.array(z.string()).min(1, "Tick at least one carton to ship.").max(100, "At most 100 cartons in one shipment.")),
  shippedOn: calendarDate("Give the date the cartons left, as YYYY-MM-DD."),
  carrier: z.string({ error: "Name the carrier." }).trim().min(1, "Name the carrier.").max(80, "At most 80 characters."),
  tracking: z.string({ error: "Give the carrier's tracking number." }).trim().min(1, "Give the carrier's tracking number.").max(80, "At most 80 characters."),
});
