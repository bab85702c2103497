import { z } from "zod";

/** The re-test form: the case and both finished responses, read in the browser and sent as text. */
export const retestSchema = z.object({
  code: z.string().trim().min(3, "The case is missing.").max(40),
  leftName: z.string().max(200).default("left.txt"),
  leftText: z.string().min(1, "Choose the left speaker's response file.").max(2_000_000),
  rightName: z.string().max(200).default("right.txt"),
  rightText: z.string().min(1, "Choose the right speaker's response file.").max(2_000_000),
});
