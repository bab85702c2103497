import { z } from "zod";
import { stringList } from "@/lib/forms";
import { AFFECTED_ACTIONS, AFFECTED_GROUPS } from "@/lib/vocabulary/containments";

const field = (max: number, message: string) => z.string({ error: message }).max(max, message).default("");
const code = field(40, "The containment is not named.");

/** One group's action form: the ticked serials, or every serial of the group that can move. */
export const moveFormSchema = z.object({
  code,
  group: z.enum(AFFECTED_GROUPS, { error: "The page is out of date: reload it." }),
  serials: stringList(z.string().max(80)).pipe(z.array(z.string()).max(1000, "Tick at most 1,000 serials, or choose every serial of the group.")),
  /** "yes": act on every serial of the group that can take this step, shown or not. */
  wholeGroup: z.enum(["yes", ""]).default(""),
  to: z.enum(AFFECTED_ACTIONS, { error: "Choose what was done." }),
  note: field(1000, "Keep the note to 1000 characters."),
});

export const noticesFormSchema = z.object({
  code,
  ownerWords: field(1000, "Keep the words for owners to 1000 characters."),
});

export const closeFormSchema = z.object({
  code,
  reason: field(2000, "Keep the reason to 2000 characters."),
});
