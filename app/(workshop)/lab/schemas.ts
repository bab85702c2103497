import { z } from "zod";
import { now } from "@/lib/clock";
import { isoDay } from "@/lib/dispatch/dates";
import { calendarDate } from "@/lib/input/dates";
import { measure, wholeNumber } from "@/lib/input/numbers";
import { batchCountMismatch, splitMakerSerials } from "@/lib/lab/batch-count";
import { PART_TYPES } from "@/lib/vocabulary/part-types";

/** A measure typed by hand (decimal point or comma, lib/input/numbers.ts); blank is "not measured". */
const optionalNumber = (label: string) => measure(z.number({ error: `${label} is a number, such as 0.35 or 0,35.` }).nullable(), { empty: null });
/** A day up to tomorrow (a time zone apart), by the workshop's clock. */
const notInFuture = (d: string) => d <= isoDay(new Date(now().getTime() + 86_400_000));

export const batchSchema = z.object({
  partType: z.enum(PART_TYPES, { error: "Choose the part type." }),
  partNumber: z.string().trim().min(1, "Enter the maker's part number.").max(60),
  maker: z.string().trim().min(2, "Enter the maker.").max(120),
  lot: z.string().trim().min(1, "Enter the production or supplier lot.").max(60),
  receivedOn: calendarDate().refine(notInFuture, "The date received cannot be in the future."),
  makerSerials: z
    .string()
    .max(20_000)
    .default("")
    .transform(splitMakerSerials),
  count: wholeNumber(z.number({ error: "Give the number of units, as a whole number such as 24." }).int("A whole number.").min(0).max(500, "At most 500 units.").nullable(), { empty: null }).transform((n) => n ?? 0),
})
  .refine((v) => v.makerSerials.length > 0 || v.count > 0, { message: "Give the number of units, or scan the makers' serials.", path: ["count"] })
  // Numbers that do not add up are a slip somewhere: refuse rather than guess which one is right.
  .superRefine((v, ctx) => {
    const mismatch = batchCountMismatch(v.count, v.makerSerials.length);
    if (mismatch) ctx.addIssue({ code: "custom", message: mismatch, path: ["count"] });
  });

export const measurementSchema = z.object({
  batch: z.string().min(1),
  itemId: z.string().min(1),
  responseName: z.string().max(200).default(""),
  responseText: z.string().max(2_000_000, "The response file is too large (2 MB at most).").default(""),
  fsHz: optionalNumber("Fs"),
  qts: optionalNumber("Qts"),
  qes: optionalNumber("Qes"),
  qms: optionalNumber("Qms"),
  reOhm: optionalNumber("Re"),
  vasL: optionalNumber("Vas"),
  sensitivityDb: optionalNumber("Sensitivity"),
});

export const failSchema = z.object({
  batch: z.string().min(1),
  itemId: z.string().min(1),
  reason: z.string().trim().min(3, "Say what failed.").max(300),
});

export const tsCsvSchema = z.object({
  batch: z.string().min(1),
  csv: z.string().min(1, "Paste the CSV or choose a file.").max(500_000, "The CSV is too long."),
});

export const acceptSchema = z.object({
  batch: z.string().min(1),
  batchId: z.string().min(1),
  modelId: z.string().min(1),
  fsWeight: measure(z.number({ error: "A weight is a number from 0 to 10." }).min(0, "At least 0.").max(10, "At most 10.").nullable(), { empty: null }).transform((n) => n ?? 0),
  qtsWeight: measure(z.number({ error: "A weight is a number from 0 to 10." }).min(0, "At least 0.").max(10, "At most 10.").nullable(), { empty: null }).transform((n) => n ?? 0),
  pairs: z
    .string()
    .regex(/^[\w*-]+:[\w*-]+(;[\w*-]+:[\w*-]+)*$/, "The plan did not come through; draw it again.")
    .transform((t) => t.split(";").map((p) => {
      const [a, b] = p.split(":");
      return { a: a!, b: b! };
    })),
});
