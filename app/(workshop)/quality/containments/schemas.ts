import { z } from "zod";

const field = (max: number, message: string) => z.string({ error: message }).max(max, message).default("");

/** The raise form as the browser sends it; lib/containments/raise.ts reads and refuses the rest. */
export const raiseFormSchema = z.object({
  /** "item": a serial, lot, batch or flitch; "window": a station of the route and two dates. */
  by: z.enum(["item", "window"], { error: "Say whether you name a lot or serial, or a station and dates." }),
  target: field(200, "That is too long to be a serial, lot or batch."),
  station: field(40, "Choose a station of the cabinet route."),
  from: field(40, "Give the first day as YYYY-MM-DD."),
  to: field(40, "Give the last day as YYYY-MM-DD."),
  reason: field(2000, "Keep the reason to 2000 characters."),
  severity: field(20, "Choose how severe it is."),
});
