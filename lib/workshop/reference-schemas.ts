/**
 * The admin's forms for finishes, dealers and owners, as zod schemas shared by the form's action and
 * the lib functions' callers. Pure: no database.
 */
import { z } from "zod";
import { EMAIL_MESSAGE, emailAddress, isEmailAddress } from "@/lib/input/email";
import { isVeneerCut } from "@/lib/vocabulary/veneer-cuts";
import { countryProblem } from "./countries";

const optionalId = z.string().optional().default("").transform((v) => v.trim() || null);

/** A colour reference: an sRGB hex ("#3E4A52") or a colour-card reference ("RAL 7016", "NCS S 2030-B"). */
export function colourRefProblem(raw: string): string | null {
  const v = raw.trim();
  if (v === "") return "Give the colour's reference: an sRGB hex such as #3E4A52, or its colour-card reference.";
  if (v.startsWith("#")) return /^#[0-9A-Fa-f]{6}$/.test(v) ? null : "An sRGB reference is # and six hex digits, e.g. #3E4A52.";
  return /^[A-Z]{2,6}[ -]?[0-9A-Z][0-9A-Z .-]{0,20}$/.test(v) ? null : "Give an sRGB hex (#3E4A52) or a colour-card reference in capitals and digits (RAL 7016).";
}


export const finishSchema = z
  .object({
    finishId: optionalId,
    kind: z.enum(["veneer", "lacquer"], { error: "Choose veneer species or lacquer colour." }),
    code: z
      .string({ error: "Give the finish's code." })
      .trim()
      .toUpperCase()
      .regex(/^[A-Z0-9]{2,4}$/, "The code is 2 to 4 capital letters or digits, e.g. WAL: a flitch's serial carries it."),
    name: z.string({ error: "Give its name." }).trim().min(2, "Give its name: the trade name of a species, or the colour's name.").max(80, "Keep the name under 80 characters."),
    botanicalName: z.string().optional().default("").transform((v) => v.trim()),
    cut: z.string().optional().default("").transform((v) => v.trim()),
    colourRef: z.string().optional().default("").transform((v) => v.trim()),
    detail: z.string().optional().default("").transform((v) => v.trim()).pipe(z.string().max(120, "Keep the note under 120 characters.")),
  })
  .superRefine((f, ctx) => {
    if (f.kind === "veneer") {
      if (f.botanicalName.length < 3) ctx.addIssue({ code: "custom", path: ["botanicalName"], message: "Give the species' botanical name, e.g. Juglans nigra." });
      if (f.cut !== "" && !isVeneerCut(f.cut)) ctx.addIssue({ code: "custom", path: ["cut"], message: "Choose a cut from the list." });
    } else {
      const problem = colourRefProblem(f.colourRef);
      if (problem) ctx.addIssue({ code: "custom", path: ["colourRef"], message: problem });
    }
  })
  // A species keeps no colour reference and a colour no botanical name or cut.
  .transform((f) => (f.kind === "veneer" ? { ...f, colourRef: "" } : { ...f, botanicalName: "", cut: "" }));
export type FinishInput = z.output<typeof finishSchema>;

const country = z
  .string({ error: "Give the country's two-letter code." })
  .trim()
  .toUpperCase()
  .superRefine((v, ctx) => {
    const problem = countryProblem(v);
    if (problem) ctx.addIssue({ code: "custom", message: problem });
  });

export const dealerSchema = z.object({
  dealerId: optionalId,
  code: z
    .string({ error: "Give the dealer's code." })
    .trim()
    .toUpperCase()
    .regex(/^[A-Z0-9]{2,4}$/, "The code is 2 to 4 capital letters or digits, e.g. MLR: a shipment's serial carries it."),
  name: z.string({ error: "Give the dealer's name." }).trim().min(2, "Give the dealer's name.").max(120, "Keep the name under 120 characters."),
  address: z
    .string({ error: "Give the street address." })
    .transform((v) => v.split(/\r?\n/).map((l) => l.trim()).filter(Boolean).join("\n"))
    .pipe(z.string().min(3, "Give the street address, one line per line of the label.").max(300, "Keep the address under 300 characters.")),
  postcode: z.string().optional().default("").transform((v) => v.trim()).pipe(z.string().max(20, "Keep the postcode under 20 characters.")),
  city: z.string({ error: "Give the town or city." }).trim().min(2, "Give the town or city.").max(80, "Keep the town under 80 characters."),
  country,
  email: emailAddress("Give the e-mail address the dealer takes orders and notices at."),
});
export type DealerInput = z.output<typeof dealerSchema>;

const reason = z.string({ error: "Say why." }).trim().min(5, "Say why, in a few words: the reason is kept with the change.").max(500, "Keep the reason under 500 characters.");

export const ownerCorrectionSchema = z.object({
  ownerId: z.string({ error: "Choose an owner." }).trim().min(1, "Choose an owner."),
  name: z.string({ error: "Give the owner's name." }).trim().min(2, "Give the owner's name.").max(120, "Keep the name under 120 characters."),
  email: z
    .string()
    .optional()
    .default("")
    .transform((v) => v.trim().toLowerCase())
    .superRefine((v, ctx) => {
      if (v !== "" && !isEmailAddress(v)) ctx.addIssue({ code: "custom", message: EMAIL_MESSAGE });
    })
    .transform((v) => v || null),
  town: z.string({ error: "Give the town." }).trim().min(2, "Give the town.").max(80, "Keep the town under 80 characters."),
  country,
  reason,
});
export type OwnerCorrection = z.output<typeof ownerCorrectionSchema>;

export const ownerMergeSchema = z
  .object({
    keepId: z.string({ error: "Choose the record to keep." }).trim().min(1, "Choose the record to keep."),
    mergeId: z.string({ error: "Choose the duplicate." }).trim().min(1, "Choose the duplicate to merge into it."),
    reason,
  })
  .refine((m) => m.keepId !== m.mergeId, { path: ["mergeId"], message: "Choose two different records: a record cannot be merged into itself." });
export type OwnerMerge = z.output<typeof ownerMergeSchema>;
