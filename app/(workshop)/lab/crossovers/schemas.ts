import { z } from "zod";
import { measure } from "@/lib/input/numbers";

/**
 * The build form sends its rows as JSON in one hidden field, `parts`: an array of
 * { position, lot, partNumber, nominal, tolerance, reading }, all strings as typed. The rows live in
 * the form's state (so React does not reset them when the action returns), and the JSON keeps
 * each row's fields together however many rows there are. Only the shape and sizes are checked
 * here; what the values mean (positions, E24 nominals, tolerance letters, lots) is checked by
 * lib/lab/crossovers `buildCrossover`, which answers each row's problems under `parts.<index>`.
 */
import { MAX_ROWS } from "./limits";
export { MAX_ROWS };

const text = (max: number, label: string) => z.string({ error: `${label} must be text.` }).max(max, `${label}: at most ${max} characters.`).default("");

export const partRowSchema = z.object({
  position: text(8, "Position"),
  lot: text(60, "Lot code"),
  partNumber: text(80, "Part number"),
  nominal: text(30, "Nominal"),
  tolerance: text(4, "Tolerance"),
  reading: text(30, "Reading"),
});
export type PartRow = z.output<typeof partRowSchema>;

export const buildSchema = z.object({
  modelId: z.string({ error: "Choose the model the board is for." }).trim().min(1, "Choose the model the board is for."),
  parts: z
    .string({ error: "Add at least one part." })
    .max(100_000, "Too many parts in one board.")
    .transform((t, ctx) => {
      try {
        return JSON.parse(t) as unknown;
      } catch {
        ctx.addIssue({ code: "custom", message: "The parts did not come through; reload the page and try again." });
        return z.NEVER;
      }
    })
    .pipe(z.array(partRowSchema, { error: "The parts did not come through; reload the page and try again." }).min(1, "Add at least one part.").max(MAX_ROWS, `A board lists at most ${MAX_ROWS} parts.`)),
  responseName: z.string().max(200).default(""),
  responseText: z.string().max(2_000_000, "The response file is too large (2 MB at most).").default(""),
});

/** The limit of the "Pair boards" form and of an accepted plan: dB, greater than 0. */
export const limitSchema = measure(z.number({ error: "Give the limit in dB, such as 0.5." }).positive("The limit is greater than 0 dB.").max(10, "At most 10 dB."));

export const acceptCrossoversSchema = z.object({
  modelId: z.string({ error: "Choose the model." }).min(1, "Choose the model."),
  limitDb: limitSchema,
  pairs: z
    .string({ error: "The plan did not come through; draw it again." })
    .regex(/^[\w*-]+:[\w*-]+(;[\w*-]+:[\w*-]+)*$/, "The plan did not come through; draw it again.")
    .transform((t) =>
      t.split(";").map((p) => {
        const [a, b] = p.split(":");
        return { a: a!, b: b! };
      }),
    ),
});
