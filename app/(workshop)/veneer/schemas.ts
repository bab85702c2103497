import { z } from "zod";
import { now } from "@/lib/clock";
import { isoDay } from "@/lib/dispatch/dates";
import { calendarDate } from "@/lib/input/dates";
import { measure, wholeNumber } from "@/lib/input/numbers";
import { DEFECT_KINDS } from "@/lib/vocabulary/defects";
import { LEAF_MAX } from "@/lib/serials/format";

/** A size in mm typed by hand: a decimal comma is fine; empty means "not measured". */
const mm = (label: string, max = 5000, zeroAllowed = false) =>
  measure(
    z
      .number({ error: `${label} is a number of millimetres.` })
      .refine((n) => (zeroAllowed ? n >= 0 : n > 0), zeroAllowed ? `${label} cannot be below 0 mm.` : `${label} must be more than 0 mm.`)
      .refine((n) => n <= max, `${label} is at most ${max} mm.`)
      .nullable(),
    { empty: null },
  );

/** A day up to tomorrow (a time zone apart), by the workshop's clock. */
const isoDate = calendarDate().refine((d) => d <= isoDay(new Date(now().getTime() + 86_400_000)), "The date received cannot be in the future.");

export const receiveSchema = z.object({
  finishId: z.string().min(1, "Choose the species."),
  logReference: z.string().trim().min(1, "Enter the log or bundle reference.").max(60, "Keep the reference under 60 characters."),
  supplier: z.string().trim().min(2, "Enter the supplier.").max(120, "Keep the supplier under 120 characters."),
  receivedOn: isoDate,
  leafThicknessMm: measure(z.number({ error: "Give the thickness in millimetres, such as 0.6." }).min(0.1, "Decorative veneer is at least 0.1 mm.").max(5, "At most 5 mm.")),
  leafCount: wholeNumber(
    z
      .number({ error: "Give the number of leaves, as a whole number such as 24." })
      .int("A whole number of leaves.")
      .min(1, "At least one leaf.")
      .max(LEAF_MAX, `At most ${LEAF_MAX} leaves in one flitch.`),
  ),
});

export const measureSchema = z.object({
  flitch: z.string().min(1),
  leafId: z.string().min(1),
  lengthMm: mm("Length"),
  widthMm: mm("Width", 1000),
  usable: z.preprocess((v) => v === "on" || v === "true", z.boolean()),
});

export const defectSchema = z.object({
  flitch: z.string().min(1),
  leafId: z.string().min(1),
  kind: z.enum(DEFECT_KINDS, { error: "Choose the kind of defect." }),
  note: z.string().trim().max(200, "Keep the note under 200 characters.").default(""),
  positionMm: mm("Position", 5000, true),
  stillUsable: z.preprocess((v) => v === "on" || v === "true", z.boolean()),
});

export const clearDefectSchema = z.object({
  flitch: z.string().min(1),
  defectId: wholeNumber(z.number({ error: "Choose the defect." }).int().positive("Choose the defect.")),
  reason: z.string().trim().min(3, "Say why the defect is cleared.").max(200),
});

export const importSchema = z.object({
  flitch: z.string().min(1),
  csv: z.string().min(1, "Paste the CSV or choose a file.").max(200_000, "The CSV is too long (at most 200 kB)."),
});

/** One run as the plan form sends it: "1,3|2,4|5" (left | right | reserve). */
const runText = z
  .string()
  .regex(/^\d+(,\d+)*\|\d+(,\d+)*\|(\d+(,\d+)*)?$/, "A run is sent as left|right|reserve leaf numbers.")
  .transform((t) => {
    const [l, r, s] = t.split("|");
    const nums = (x: string | undefined) => (x ? x.split(",").map(Number) : []);
    return { left: nums(l), right: nums(r), reserve: nums(s) };
  });

export const confirmSchema = z.object({
  flitch: z.string().min(1),
  flitchId: z.string().min(1),
  modelId: z.string().min(1, "Choose the model."),
  reservePerPair: wholeNumber(z.number({ error: "Give the reserve leaves per pair, 0 to 4." }).int().min(0, "At least 0.").max(4, "At most 4 reserve leaves per pair.")),
  runs: z.preprocess((v) => (v === undefined || v === "" ? [] : Array.isArray(v) ? v : [v]), z.array(runText)).refine((r) => r.length > 0, "Tick at least one run to confirm."),
});

export const reserveSchema = z.object({
  pair: z.string().min(1),
  leafId: z.string().min(1),
  reason: z.string().trim().min(3, "Say why.").max(300),
});

export const releaseSchema = reserveSchema.extend({
  cabinetId: z.string().min(1, "Choose the cabinet."),
  position: z.string().regex(/^F\d{1,2}$/, "Choose the face position."),
});
