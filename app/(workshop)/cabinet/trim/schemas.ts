import { z } from "zod";
import { wholeNumber } from "@/lib/input/numbers";

/** A supplier's delivery of trim parts for one position of one model. */
export const receiveTrimSchema = z.object({
  modelId: z.string().min(1, "Choose the model."),
  position: z.string().trim().min(1, "Choose the trim position.").max(12),
  supplier: z.string().trim().min(1, "Give the supplier's name, as on the delivery note.").max(80, "At most 80 characters."),
  lotCode: z.string().trim().min(1, "Give the supplier's lot code, as on the delivery note or the box.").max(40, "At most 40 characters."),
  count: wholeNumber(z.number({ error: "Give how many parts, as a whole number such as 4." }).int("A whole number.").min(1, "Receive at least 1 part.").max(200, "At most 200 parts at once.")),
});
