import { z } from "zod";

/**
 * Input of the assembly station's forms, shared by the forms and the actions. Only the shape and
 * sizes are checked here; what a scan means (kind, part type, set, partner, hold…) is decided by
 * lib/assembly, which answers in words a fitter reads at the bench.
 */

/** Fields a model's speaker has at most: its drive-unit positions and the crossover, on two sides. */
export const MAX_SCANS = 40;

const side = z.enum(["L", "R"], { error: "A speaker is either left or right." });
const slot = z.string().trim().toUpperCase().min(1, "Name the position.").max(12, "Not a position.");
const code = z.string({ error: "Scan or type the label." }).trim().min(1, "Scan or type the label.").max(80, "A label holds at most 80 characters.");

/** A JSON array sent in one hidden field, so its rows keep their fields together. */
const jsonList = <T extends z.ZodType>(row: T, message: string) =>
  z
    .string({ error: message })
    .max(20_000, message)
    .transform((t, ctx) => {
      try {
        return JSON.parse(t) as unknown;
      } catch {
        ctx.addIssue({ code: "custom", message });
        return z.NEVER;
      }
    })
    .pipe(z.array(row, { error: message }).max(MAX_SCANS, message));

/** A checkbox: "on" (or "true") when ticked, absent when not. */
const ticked = z.preprocess((v) => v === "on" || v === "true" || v === true, z.boolean());

export const openPairSchema = z.object({
  code: z.string().trim().min(3, "Scan or type a pair, cabinet or speaker label.").max(80),
});

export const checkScanSchema = z.object({
  pairId: z.string().min(1, "The pair did not come through; reload the page."),
  side,
  slot,
  code,
  /** What the other fields hold now: [{ side, slot, itemId }]. */
  chosen: jsonList(z.object({ side, slot, itemId: z.string().min(1).max(64) }), "The other scans did not come through; reload the page.").default([]),
});

export const buildSchema = z.object({
  pair: z.string().min(1),
  pairId: z.string().min(1, "The pair did not come through; reload the page."),
  /** Every field as scanned: [{ side, slot, code }]; an empty code is a field not yet scanned. */
  scans: jsonList(z.object({ side, slot, code: z.string().max(80) }), "The scans did not come through; reload the page and scan again."),
  clean: ticked,
  inspected: ticked,
  note: z.string().trim().max(500, "At most 500 characters.").default(""),
});

export const pairLacquerSchema = z.object({
  left: z.string().trim().min(3, "Scan or type the left cabinet's serial.").max(80),
  right: z.string().trim().min(3, "Scan or type the right cabinet's serial.").max(80),
});
