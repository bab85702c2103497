import { z } from "zod";

export const dispositionSchema = z.object({
  ncId: z.string().min(1),
  back: z.string().default(""),
  disposition: z.enum(["rework", "use_as_is", "scrap"], { error: "Choose rework, use as is, or scrap." }),
  reworkToSeq: z.preprocess((v) => (v === "" || v === undefined ? null : v), z.coerce.number().int().min(1).nullable()),
  scrapSide: z.preprocess((v) => (v === "" || v === undefined ? null : v), z.enum(["L", "R"]).nullable()),
  reason: z.string().trim().min(5, "Give the reason (at least a few words).").max(500),
});
