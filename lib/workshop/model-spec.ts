/**
 * A model's whole spec as one value: what the admin's form edits, what a model version keeps, and
 * what the lab, assembly, packing and the service desk read for an item made under that version.
 * Pure (no database): the form's schema and the checks that look across fields live here.
 */
import { z } from "zod";
import { gs1CheckDigit } from "@/lib/serials/gs1";
import { CROSSOVER_POSITION } from "@/lib/vocabulary/positions";
import { PART_TYPES, type PartType } from "@/lib/vocabulary/part-types";

export interface ModelSpec {
  code: string;
  name: string;
  leavesPerFace: number;
  minLeafLengthMm: number;
  minLeafWidthMm: number;
  pairResponseLimitDb: number;
  responseMinHz: number;
  responseMaxHz: number;
  pairGtin: string;
  warrantyMonths: number;
  positions: { position: string; partType: PartType; count: number }[];
  crossovers: { position: string; count: number }[];
  trimPositions: { position: string; label: string; count: number }[];
  tolerances: { partType: PartType; mismatchLimitDb: number }[];
  /** The carton's lines after the two speakers and the certificate. */
  packingList: string[];
}

/** The spec with the model's id and the version it is (0 when no version has been recorded yet). */
export interface ModelSpecVersion extends ModelSpec {
  id: string;
  version: number;
  active: boolean;
}

/**
 * Why a GTIN-14 is not one, in words for the field, or null when it is: fourteen digits whose last is
 * the GS1 mod-10 check digit of the first thirteen (GS1 General Specifications §7.9.1).
 */
export function gtinProblem(raw: string): string | null {
  const gtin = raw.trim();
  if (!/^\d+$/.test(gtin)) return "A GTIN is digits only.";
  if (gtin.length !== 14) return `A pair's GTIN has 14 digits; this one has ${gtin.length}. Put zeros in front of a shorter GTIN.`;
  const expected = gs1CheckDigit(gtin.slice(0, 13));
  const given = Number(gtin[13]);
  if (expected !== given) return `The last digit is the check digit: for ${gtin.slice(0, 13)} it is ${expected}, not ${given}. Check the number against the GS1 allocation.`;
  return null;
}

const num = (label: string, opts: { min?: number; gt?: number; max?: number; int?: boolean; unit?: string }) =>
  z
    .union([z.string(), z.number()], { error: `Give the ${label}.` })
    .transform((v, ctx) => {
      const text = String(v).trim().replace(",", ".");
      const n = text === "" ? NaN : Number(text);
      const unit = opts.unit ? ` ${opts.unit}` : "";
      if (!Number.isFinite(n) || !/^-?\d+(\.\d+)?$/.test(text)) {
        ctx.addIssue({ code: "custom", message: text === "" ? `Give the ${label}.` : `The ${label} is a number${unit ? ` in${unit}` : ""}.` });
        return z.NEVER;
      }
      if (opts.int && !Number.isInteger(n)) ctx.addIssue({ code: "custom", message: `The ${label} is a whole number.` });
      else if (opts.gt !== undefined && !(n > opts.gt)) ctx.addIssue({ code: "custom", message: `The ${label} must be more than ${opts.gt}${unit}.` });
      else if (opts.min !== undefined && n < opts.min) ctx.addIssue({ code: "custom", message: `The ${label} must be at least ${opts.min}${unit}.` });
      else if (opts.max !== undefined && n > opts.max) ctx.addIssue({ code: "custom", message: `The ${label} must be at most ${opts.max}${unit}.` });
      return n;
    });

const DRIVE_CODE = /^[A-Z][A-Z0-9-]{0,5}$/;
const TRIM_CODE = /^[A-Z][A-Z0-9-]{1,11}$/;
const XO_CODE = /^XO[A-Z0-9-]{0,10}$/;

/** The whole spec as the form sends it (positions as JSON lists), with every field's own rule. */
export const modelSpecSchema = z
  .object({
    code: z
      .string({ error: "Give the model's code." })
      .trim()
      .toUpperCase()
      .regex(/^[A-Z0-9]{2,4}$/, "The code is 2 to 4 capital letters or digits, e.g. PW2: it goes into every serial."),
    name: z.string({ error: "Give the model's name." }).trim().min(2, "Give the model's name.").max(80, "Keep the name under 80 characters."),
    leavesPerFace: num("number of leaves per face", { min: 1, max: 20, int: true }),
    minLeafLengthMm: num("smallest leaf length", { gt: 0, max: 5000, unit: "mm" }),
    minLeafWidthMm: num("smallest leaf width", { gt: 0, max: 2000, unit: "mm" }),
    pairResponseLimitDb: num("finished pair limit", { gt: 0, max: 20, unit: "dB" }),
    responseMinHz: num("lowest frequency tested", { gt: 0, max: 40000, unit: "Hz" }),
    responseMaxHz: num("highest frequency tested", { gt: 0, max: 40000, unit: "Hz" }),
    pairGtin: z
      .string({ error: "Give the pair's GTIN-14." })
      .trim()
      .superRefine((v, ctx) => {
        const problem = gtinProblem(v);
        if (problem) ctx.addIssue({ code: "custom", message: problem });
      }),
    warrantyMonths: num("warranty", { min: 0, max: 600, int: true, unit: "months" }),
    positions: z
      .array(
        z.object({
          position: z.string().trim().toUpperCase().regex(DRIVE_CODE, "A drive-unit position is a short code of capitals, e.g. T, M, B1."),
          partType: z.enum(PART_TYPES, { error: "Choose tweeter, midrange or bass." }),
          count: num("count", { min: 1, max: 8, int: true }),
        }),
      )
      .min(1, "A model has at least one drive-unit position."),
    crossovers: z
      .array(
        z.object({
          position: z.string().trim().toUpperCase().regex(XO_CODE, "A crossover position starts with XO, e.g. XO or XO-B."),
          count: num("count", { min: 1, max: 4, int: true }),
        }),
      )
      .refine((xs) => xs.some((x) => x.position === CROSSOVER_POSITION), `Every model has the crossover position ${CROSSOVER_POSITION}: assembly fits the board there.`),
    trimPositions: z.array(
      z.object({
        position: z.string().trim().toUpperCase().regex(TRIM_CODE, "A trim position is 2 to 12 capitals, e.g. TOP or PLINTH."),
        label: z.string().trim().min(2, "Say what the part is, e.g. Top housing.").max(60, "Keep the name under 60 characters."),
        count: num("count", { min: 1, max: 8, int: true }),
      }),
    ),
    tolerances: z.array(z.object({ partType: z.enum(PART_TYPES), mismatchLimitDb: num("mismatch limit", { gt: 0, max: 10, unit: "dB" }) })),
    packingList: z.array(z.string().trim().max(80, "Keep each packing line under 80 characters.")).transform((l) => l.filter((x) => x !== "")),
  })
  .superRefine((s, ctx) => {
    if (s.responseMaxHz <= s.responseMinHz) ctx.addIssue({ code: "custom", path: ["responseMaxHz"], message: "The highest frequency must be above the lowest." });
    for (const p of positionClashes(s)) ctx.addIssue({ code: "custom", path: [p.list], message: p.message });
    const types = new Set(s.positions.map((p) => p.partType));
    for (const t of types) {
      if (!s.tolerances.some((x) => x.partType === t)) ctx.addIssue({ code: "custom", path: ["tolerances"], message: `Give a mismatch limit for every part type the model holds (${t} has none).` });
    }
    const seen = new Set<string>();
    for (const t of s.tolerances) {
      if (seen.has(t.partType)) ctx.addIssue({ code: "custom", path: ["tolerances"], message: `The ${t.partType} limit is given twice.` });
      seen.add(t.partType);
    }
  });

export type ModelSpecInput = z.input<typeof modelSpecSchema>;

/**
 * Position codes used more than once across drive-unit, crossover and trim positions together:
 * a code names one place in a speaker, whatever sits there.
 */
export function positionClashes(s: Pick<ModelSpec, "positions" | "crossovers" | "trimPositions">): { list: "positions" | "crossovers" | "trimPositions"; code: string; message: string }[] {
  const where = new Map<string, string>();
  const out: { list: "positions" | "crossovers" | "trimPositions"; code: string; message: string }[] = [];
  const lists = [
    ["positions", "drive-unit positions", s.positions],
    ["crossovers", "crossover positions", s.crossovers],
    ["trimPositions", "trim positions", s.trimPositions],
  ] as const;
  for (const [list, words, rows] of lists) {
    for (const r of rows) {
      const before = where.get(r.position);
      if (before) out.push({ list, code: r.position, message: `${r.position} is used twice (in ${before} and ${words}): give each position its own code.` });
      else where.set(r.position, words);
    }
  }
  return out;
}

/** Two specs are the same when every field is: saving an unchanged form makes no version. */
export function sameSpec(a: ModelSpec, b: ModelSpec): boolean {
  return JSON.stringify(canonical(a)) === JSON.stringify(canonical(b));
}

/** A spec's single values: what the models row holds of it (its lists live in tables of their own). */
export function modelColumns(s: Omit<ModelSpec, "positions" | "crossovers" | "trimPositions" | "tolerances" | "packingList">) {
  return {
    code: s.code,
    name: s.name,
    leavesPerFace: s.leavesPerFace,
    minLeafLengthMm: s.minLeafLengthMm,
    minLeafWidthMm: s.minLeafWidthMm,
    pairResponseLimitDb: s.pairResponseLimitDb,
    responseMinHz: s.responseMinHz,
    responseMaxHz: s.responseMaxHz,
    pairGtin: s.pairGtin,
    warrantyMonths: s.warrantyMonths,
  };
}

/** The spec with its lists in a fixed order, as stored in a version. */
export function canonical(s: ModelSpec): ModelSpec {
  const by = <T extends { position: string }>(xs: T[]) => [...xs].sort((x, y) => x.position.localeCompare(y.position));
  return {
    ...modelColumns(s),
    positions: by(s.positions).map(({ position, partType, count }) => ({ position, partType, count })),
    crossovers: by(s.crossovers).map(({ position, count }) => ({ position, count })),
    trimPositions: by(s.trimPositions).map(({ position, label, count }) => ({ position, label, count })),
    tolerances: [...s.tolerances].sort((x, y) => x.partType.localeCompare(y.partType)).map(({ partType, mismatchLimitDb }) => ({ partType, mismatchLimitDb })),
    packingList: [...s.packingList],
  };
}

/** The fields that changed between two versions, in words for the history. */
export function changedFields(before: ModelSpec, after: ModelSpec): string[] {
  const words: Record<keyof ModelSpec, string> = {
    code: "code",
    name: "name",
    leavesPerFace: "leaves per face",
    minLeafLengthMm: "smallest leaf length",
    minLeafWidthMm: "smallest leaf width",
    pairResponseLimitDb: "finished pair limit",
    responseMinHz: "lowest frequency tested",
    responseMaxHz: "highest frequency tested",
    pairGtin: "GTIN",
    warrantyMonths: "warranty",
    positions: "drive-unit positions",
    crossovers: "crossover positions",
    trimPositions: "trim positions",
    tolerances: "mismatch limits",
    packingList: "packing list",
  };
  const a = canonical(before);
  const b = canonical(after);
  return (Object.keys(words) as (keyof ModelSpec)[]).filter((k) => JSON.stringify(a[k]) !== JSON.stringify(b[k])).map((k) => words[k]);
}

/** A blank model for the new-model form. */
export const BLANK_MODEL_SPEC: ModelSpec = {
  code: "",
  name: "",
  leavesPerFace: 2,
  minLeafLengthMm: 0,
  minLeafWidthMm: 0,
  pairResponseLimitDb: 1,
  responseMinHz: 100,
  responseMaxHz: 10000,
  pairGtin: "",
  warrantyMonths: 24,
  positions: [
    { position: "T", partType: "tweeter", count: 1 },
    { position: "B", partType: "bass", count: 1 },
  ],
  crossovers: [{ position: "XO", count: 1 }],
  trimPositions: [],
  tolerances: [
    { partType: "tweeter", mismatchLimitDb: 0.5 },
    { partType: "bass", mismatchLimitDb: 0.75 },
  ],
  packingList: ["Grilles (2)", "Owner's manual"],
};
