/**
 * What makes a route spec well-formed: the exact shape of StepSpec[] (no other keys), one key per
 * step and per reading, windows that make sense, holds of at most 60 days; every problem reported
 * at once with its place ("3.readings.0.max"). Also the canonical form that decides whether an
 * edit changed anything, and the words for a hold ("then wait 4 h from the start"). Pure: the
 * route editor's form, the server action and the tests share it.
 */
import { z } from "zod";
import { ROUTE_STATIONS } from "@/lib/vocabulary/stations";
import { P_GRADES } from "./rules";
import { READING_KINDS, type ReadingSpec, type StepSpec } from "./types";

const DAY_MINUTES = 24 * 60;
/** The longest hold after a step: 60 days. */
export const MAX_HOLD_MINUTES = 60 * DAY_MINUTES;
export const MAX_STEPS = 80;
export const MAX_READINGS = 12;

/** A step's key: lowercase letters and digits in words joined by hyphens, e.g. "coat-3". */
export const STEP_KEY_RE = /^[a-z0-9]+(?:-[a-z0-9]+)*$/;
/** A reading's key (a field name on the step form): a letter, then letters, digits or hyphens, e.g. "platenC". */
export const READING_KEY_RE = /^[a-z][a-zA-Z0-9]*(?:-[a-zA-Z0-9]+)*$/;

const NUMBER_MSG = "Enter a number, like 12 or 12.5, or leave it empty.";
const optionalNumber = z.number({ error: NUMBER_MSG }).refine(Number.isFinite, NUMBER_MSG).optional();

const readingSchema = z
  .strictObject(
    {
      key: z
        .string({ error: "Give the reading a key." })
        .trim()
        .min(1, { error: "Give the reading a key, e.g. platenC.", abort: true })
        .max(40, "Keep the key under 40 characters.")
        .regex(READING_KEY_RE, "A reading's key starts with a small letter and holds only letters, digits and hyphens, e.g. platenC."),
      label: z.string({ error: "Say what is read." }).trim().min(2, "Say what is read, e.g. Platen temperature.").max(100, "Keep the label under 100 characters."),
      unit: z
        .string({ error: "Enter the unit as text, or leave it empty." })
        .trim()
        .max(12, "Keep the unit under 12 characters, e.g. °C or mm.")
        .nullable()
        .optional()
        .transform((u) => (u ? u : null)),
      kind: z.enum(READING_KINDS, { error: "A reading is a number, an inspector's check, a text (such as a lot) or a grit." }),
      min: optionalNumber,
      max: optionalNumber,
      absMax: optionalNumber,
      equals: optionalNumber,
      lot: z.boolean({ error: "Say whether the text names a supplier's lot." }).optional(),
      maxLength: z.number({ error: "Enter the longest text as a whole number, or leave it empty." }).int("Enter the longest text as a whole number.").min(1, "A text takes at least 1 character.").max(200, "A text reading takes at most 200 characters.").optional(),
    },
    { error: (issue) => (issue.code === "unrecognized_keys" ? `A reading has no field ${issue.keys.join(", ")}.` : undefined) },
  )
  .superRefine((r, ctx) => {
    if (r.kind !== "text" && r.lot) ctx.addIssue({ code: "custom", path: ["lot"], message: "Only a text reading names a lot. Make the reading a text." });
    if (r.kind !== "text" && r.maxLength !== undefined) ctx.addIssue({ code: "custom", path: ["maxLength"], message: "Only a text reading has a longest length. Clear it, or make the reading a text." });
    if (r.kind === "text") {
      for (const k of ["min", "max", "absMax", "equals"] as const) {
        if (r[k] !== undefined) ctx.addIssue({ code: "custom", path: [k], message: "A text is recorded as written: it takes no window. Clear this, or make the reading a number." });
      }
      if (r.unit) ctx.addIssue({ code: "custom", path: ["unit"], message: "A text has no unit. Clear it, or make the reading a number." });
      return;
    }
    if (r.kind === "grit") {
      for (const k of ["absMax", "equals"] as const) {
        if (r[k] !== undefined) ctx.addIssue({ code: "custom", path: [k], message: "A grit takes a coarsest and a finest P-grade only. Clear this." });
      }
      for (const k of ["min", "max"] as const) {
        const v = r[k];
        if (v !== undefined && !(P_GRADES as readonly number[]).includes(v)) ctx.addIssue({ code: "custom", path: [k], message: `${v} is not a P-grade (FEPA / ISO 6344): use one of P${P_GRADES.join(", P")}.` });
      }
      if (r.unit) ctx.addIssue({ code: "custom", path: ["unit"], message: "A grit has no unit: it reads P180, P240…. Clear it." });
      if (r.min !== undefined && r.max !== undefined && r.min > r.max) ctx.addIssue({ code: "custom", path: ["max"], message: `The finest grit (P${r.max}) is coarser than the coarsest (P${r.min}). Swap them.` });
      return;
    }
    if (r.kind === "check") {
      for (const k of ["min", "max", "absMax", "equals"] as const) {
        if (r[k] !== undefined) ctx.addIssue({ code: "custom", path: [k], message: "A check is passed or not: it takes no numbers. Clear this, or make the reading a number." });
      }
      if (r.unit) ctx.addIssue({ code: "custom", path: ["unit"], message: "A check has no unit. Clear it, or make the reading a number." });
      return;
    }
    if (r.min !== undefined && r.max !== undefined && r.min > r.max) {
      ctx.addIssue({ code: "custom", path: ["max"], message: `The highest value (${r.max}) is below the lowest (${r.min}). Swap them, or correct one.` });
    }
    if (r.absMax !== undefined && !(r.absMax > 0)) {
      ctx.addIssue({ code: "custom", path: ["absMax"], message: "The ± limit is a size on either side of zero: enter a number above 0, like 0.2." });
    }
  });

const holdSchema = z.strictObject(
  {
    minutes: z
      .number({ error: "Enter how long the wait is, or clear the hold." })
      .int("Enter the wait in whole minutes.")
      .min(1, "A wait is at least 1 minute.")
      .max(MAX_HOLD_MINUTES, "A wait is at most 60 days."),
    from: z.enum(["start", "end"], { error: "Count the wait from when the step started or from when it was recorded." }),
    label: z.string({ error: "Name the wait." }).trim().min(2, "Name the wait, e.g. clamp 2 h and rest 2 h, or curing.").max(80, "Keep the name of the wait under 80 characters."),
  },
  { error: (issue) => (issue.code === "unrecognized_keys" ? `A hold has no field ${issue.keys.join(", ")}.` : undefined) },
);

const stepSchema = z.strictObject(
  {
    /** Ignored: the server numbers the steps 1…n in the order they arrive. */
    seq: z.number().optional(),
    key: z
      .string({ error: "Give the step a key." })
      .trim()
      .min(1, { error: "Give the step a key, e.g. coat-3.", abort: true })
      .max(40, "Keep the key under 40 characters.")
      .regex(STEP_KEY_RE, "A step's key holds only small letters and digits, in words joined by hyphens, e.g. coat-3."),
    name: z.string({ error: "Name the step." }).trim().min(2, "Name the step, e.g. Lacquer coat 3, stoved.").max(80, "Keep the name under 80 characters."),
    station: z.enum(ROUTE_STATIONS, { error: "Choose a station from the list." }),
    readings: z.array(readingSchema, { error: "The readings are missing." }).max(MAX_READINGS, `A step takes at most ${MAX_READINGS} readings.`),
    holdAfter: holdSchema.optional(),
    note: z
      .string({ error: "The note is text." })
      .trim()
      .max(500, "Keep the note under 500 characters.")
      .optional()
      .transform((n) => (n ? n : undefined)),
  },
  { error: (issue) => (issue.code === "unrecognized_keys" ? `A step has no field ${issue.keys.join(", ")}.` : undefined) },
);

export const stepsSchema = z
  .array(stepSchema, { error: "The steps did not arrive as a list. Reload the page and try again." })
  .min(1, "A route needs at least one step.")
  .max(MAX_STEPS, `A route has at most ${MAX_STEPS} steps.`)
  .superRefine((steps, ctx) => {
    for (const issue of duplicateKeyIssues(steps)) ctx.addIssue({ code: "custom", ...issue });
  })
  .transform((steps): StepSpec[] => canonicalSteps(steps));

/**
 * Step keys repeated in the route, and reading keys repeated in a step. Works on what arrived as
 * well as on parsed steps, so a duplicate is reported even when other fields also need attention.
 */
export function duplicateKeyIssues(steps: unknown): { path: (string | number)[]; message: string }[] {
  if (!Array.isArray(steps)) return [];
  const keyOf = (v: unknown) => (v && typeof v === "object" && typeof (v as { key?: unknown }).key === "string" ? (v as { key: string }).key.trim() : "");
  const out: { path: (string | number)[]; message: string }[] = [];
  const seen = new Map<string, number>();
  steps.forEach((s: unknown, i) => {
    const key = keyOf(s);
    if (key) {
      const first = seen.get(key);
      if (first === undefined) seen.set(key, i);
      else out.push({ path: [i, "key"], message: `Step ${first + 1} already has the key “${key}”: each step needs its own.` });
    }
    const readings = s && typeof s === "object" ? (s as { readings?: unknown }).readings : undefined;
    if (!Array.isArray(readings)) return;
    const keys = new Map<string, number>();
    readings.forEach((r: unknown, j) => {
      const rk = keyOf(r);
      if (!rk) return;
      const firstReading = keys.get(rk);
      if (firstReading === undefined) keys.set(rk, j);
      else out.push({ path: [i, "readings", j, "key"], message: `Reading ${firstReading + 1} of this step already has the key “${rk}”.` });
    });
  });
  return out;
}

// ---- canonical form, for comparing versions -----------------------------------------------------

function canonicalReading(r: ReadingSpec): ReadingSpec {
  const out: ReadingSpec = { key: r.key, label: r.label, unit: r.unit ?? null, kind: r.kind };
  if (r.kind === "text" && r.maxLength !== undefined) out.maxLength = r.maxLength;
  if (r.kind === "text" && r.lot) out.lot = true;
  if (r.kind === "grit") {
    if (r.min !== undefined) out.min = r.min;
    if (r.max !== undefined) out.max = r.max;
  }
  if (r.kind === "number") {
    if (r.min !== undefined) out.min = r.min;
    if (r.max !== undefined) out.max = r.max;
    if (r.absMax !== undefined) out.absMax = r.absMax;
    if (r.equals !== undefined) out.equals = r.equals;
  }
  return out;
}

/** Steps numbered 1…n, every object's keys in one order and absent fields left out. */
export function canonicalSteps(steps: (Omit<StepSpec, "seq"> & { seq?: number })[]): StepSpec[] {
  return steps.map((s, i) => {
    const out: StepSpec = { seq: i + 1, key: s.key, name: s.name, station: s.station, readings: s.readings.map(canonicalReading) };
    if (s.holdAfter) out.holdAfter = { minutes: s.holdAfter.minutes, from: s.holdAfter.from, label: s.holdAfter.label };
    if (s.note) out.note = s.note;
    return out;
  });
}

export function sameSteps(a: StepSpec[], b: StepSpec[]): boolean {
  return JSON.stringify(canonicalSteps(a)) === JSON.stringify(canonicalSteps(b));
}

// ---- words --------------------------------------------------------------------------------------

// In a module of their own without zod, since the route editor (a client form) shows them.
export { durationText, holdText } from "./hold-words";

