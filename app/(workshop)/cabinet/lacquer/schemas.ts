import { z } from "zod";
import { wholeNumber } from "@/lib/input/numbers";

/** Lacquer cabinets are made several at a time, without leaves, and paired at assembly. */
export const makeLacquerSchema = z.object({
  modelId: z.string().min(1, "Choose the model."),
  finishId: z.string().min(1, "Choose the colour."),
  count: wholeNumber(z.number({ error: "Give how many cabinets, as a whole number such as 6." }).int("A whole number.").min(2, "At least 2 cabinets (one pair).").max(40, "At most 40 cabinets at once.")),
});
