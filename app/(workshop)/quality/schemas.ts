import { z } from "zod";
import { isLocalPath } from "@/lib/input/local-path";
import { wholeNumber } from "@/lib/input/numbers";

/** The one gate for every "where to go next" (lib/input/local-path.ts), shared with sign-in and the guard. */
export { isLocalPath, withQuery } from "@/lib/input/local-path";

export const dispositionSchema = z.object({
  ncId: z.string().min(1),
  /** The page the form was on, to return to: only ever a page of this site. */
  back: z
    .string()
    .max(500)
    .default("")
    .refine((b) => b === "" || isLocalPath(b), "The page to return to must be a page of Twinleaf."),
  disposition: z.enum(["rework", "use_as_is", "scrap", "entry_error"], { error: "Choose rework, use as is, scrap, or entry error." }),
  reworkToSeq: wholeNumber(z.number({ error: "Choose the step to rework back to." }).int().min(1, "Choose the step to rework back to.").max(999).nullable(), { empty: null }),
  scrapSide: z.preprocess((v) => (v === "" || v === undefined ? null : v), z.enum(["L", "R"]).nullable()),
  reason: z.string().trim().min(5, "Give the reason (at least a few words).").max(500),
});
