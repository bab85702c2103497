import { z } from "zod";
import { batchCountMismatch, splitMakerSerials } from "@/lib/lab/batch-count";
import { PART_TYPES } from "@/lib/vocabulary/part-types";

const toNumber = (v: unknown) => {
  if (typeof v !== "string") return v;
  const t = v.trim().replace(",", ".");
  return t === "" ? null : Number(t);
};
const optionalNumber = (label: string) => z.preprocess(toNumber, z.number({ error: `${label} is a number.` }).nullable());

export const batchSchema = z.object({
  partType: z.enum(PART_TYPES, { error: "Choose the part type." }),
  partNumber: z.string().trim().min(1, "Enter the maker's part number.").max(60),
  maker: z.string().trim().min(2, "Enter the maker.").max(120),
  lot: z.string().trim().min(1, "Enter the production or supplier lot.").max(60),
  receivedOn: z
    .string()
    .trim()
    .regex(/^\d{4}-\d{2}-\d{2}$/, "Give the date as YYYY-MM-DD.")
    .refine((d) => Date.parse(`${d}T00:00:00Z`) <= Date.now() + 86_400_000, "The date received cannot be in the future."),
  makerSerials: z
    .string()
    .max(20_000)
    .default("")
    .transform(splitMakerSerials),
  count: z.preprocess(toNumber, z.number({ error: "Give the number of units." }).int("A whole number.").min(0).max(500, "At most 500 units.").nullable()).transform((n) => n ?? 0),
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
  fsWeight: z.preprocess(toNumber, z.number().min(0).max(10).nullable()).transform((n) => n ?? 0),
  qtsWeight: z.preprocess(toNumber, z.number().min(0).max(10).nullable()).transform((n) => n ?? 0),
  pairs: z
    .string()
    .regex(/^[\w*-]+:[\w*-]+(;[\w*-]+:[\w*-]+)*$/, "The plan did not come through; draw it again.")
    .transform((t) => t.split(";").map((p) => {
      const [a, b] = p.split(":");
      return { a: a!, b: b! };
    })),
});
