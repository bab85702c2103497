/**
 * The route editor's draft: the steps and readings as the administrator types them (text, not yet
 * numbers), the edits the form offers (add, remove and move steps and readings), the JSON the
 * server checks (app/(workshop)/admin/routes/schemas.ts against lib/route/spec-rules.ts), and the
 * server's answer placed back on the fields it is about. Pure: no React, no server; the form
 * only renders it.
 */
import type { FormState } from "@/lib/form-state";
import { holdText } from "@/lib/route/hold-words";
import { windowText } from "@/lib/route/rules";
import type { ReadingKind, ReadingSpec, StepSpec } from "@/lib/route/types";

export type HoldUnit = "min" | "h" | "d";
export const UNIT_MINUTES: Record<HoldUnit, number> = { min: 1, h: 60, d: 24 * 60 };

/** The four limits a number reading may have, in the order the form shows them. */
export const LIMITS = ["min", "max", "absMax", "equals"] as const;

export interface ReadingDraft {
  uid: string;
  key: string;
  label: string;
  unit: string;
  kind: ReadingKind;
  min: string;
  max: string;
  absMax: string;
  equals: string;
  /** A text reading's longest length, as typed. */
  maxLength: string;
  /** A text reading that names a supplier's lot, traced into the cabinets. */
  lot: boolean;
}

export interface StepDraft {
  uid: string;
  key: string;
  name: string;
  station: string;
  readings: ReadingDraft[];
  holdAmount: string;
  holdUnit: HoldUnit;
  holdFrom: "start" | "end";
  holdLabel: string;
  note: string;
}

// ---- making drafts ------------------------------------------------------------------------------

// Steps and readings the page starts with take ids from their places (the same on the server and
// in the browser, so hydration agrees); those added while editing are numbered here, in the browser.
let uidCounter = 0;
export const newUid = (): string => `n${++uidCounter}`;

const numText = (n: number | undefined) => (n === undefined ? "" : String(n));

export function readingDraft(r?: ReadingSpec, uid: string = newUid()): ReadingDraft {
  return {
    uid,
    key: r?.key ?? "",
    label: r?.label ?? "",
    unit: r?.unit ?? "",
    kind: r?.kind ?? "number",
    min: r?.kind === "grit" && r.min !== undefined ? `P${r.min}` : numText(r?.min),
    max: r?.kind === "grit" && r.max !== undefined ? `P${r.max}` : numText(r?.max),
    absMax: numText(r?.absMax),
    equals: numText(r?.equals),
    maxLength: numText(r?.maxLength),
    lot: r?.lot === true,
  };
}

/** A step as the form edits it; a hold is shown in the largest unit that divides it. */
export function stepDraft(s?: StepSpec, uid: string = newUid()): StepDraft {
  const m = s?.holdAfter?.minutes;
  const unit: HoldUnit = m === undefined ? "h" : m % UNIT_MINUTES.d === 0 ? "d" : m % UNIT_MINUTES.h === 0 ? "h" : "min";
  return {
    uid,
    key: s?.key ?? "",
    name: s?.name ?? "",
    station: s?.station ?? "",
    readings: (s?.readings ?? []).map((r, j) => readingDraft(r, `${uid}r${j}`)),
    holdAmount: m === undefined ? "" : String(m / UNIT_MINUTES[unit]),
    holdUnit: unit,
    holdFrom: s?.holdAfter?.from ?? "end",
    holdLabel: s?.holdAfter?.label ?? "",
    note: s?.note ?? "",
  };
}

/** The draft of a saved route. `prefix` keeps ids apart when the form starts again. */
export function draftOf(steps: StepSpec[], prefix = "s"): StepDraft[] {
  return steps.map((s, i) => stepDraft(s, `${prefix}${i}`));
}

// ---- editing: each returns a new list and leaves the one it was given alone ---------------------

export function insertStep(steps: StepDraft[], index: number, step: StepDraft = stepDraft()): StepDraft[] {
  const at = Math.max(0, Math.min(index, steps.length));
  return [...steps.slice(0, at), step, ...steps.slice(at)];
}

export function removeStep(steps: StepDraft[], uid: string): StepDraft[] {
  return steps.filter((s) => s.uid !== uid);
}

function swap<T>(list: T[], index: number, by: -1 | 1): T[] {
  const to = index + by;
  if (index < 0 || index >= list.length || to < 0 || to >= list.length) return list;
  const next = [...list];
  [next[index], next[to]] = [next[to]!, next[index]!];
  return next;
}

/** Moves the step at `index` one place up (−1) or down (+1); at either end nothing moves. */
export function moveStep(steps: StepDraft[], index: number, by: -1 | 1): StepDraft[] {
  return swap(steps, index, by);
}

export function updateStep(steps: StepDraft[], uid: string, patch: Partial<Omit<StepDraft, "uid" | "readings">>): StepDraft[] {
  return steps.map((s) => (s.uid === uid ? { ...s, ...patch } : s));
}

const onStep = (steps: StepDraft[], uid: string, change: (readings: ReadingDraft[]) => ReadingDraft[]) =>
  steps.map((s) => (s.uid === uid ? { ...s, readings: change(s.readings) } : s));

export function addReading(steps: StepDraft[], stepUid: string, reading: ReadingDraft = readingDraft()): StepDraft[] {
  return onStep(steps, stepUid, (rs) => [...rs, reading]);
}

export function removeReading(steps: StepDraft[], stepUid: string, readingUid: string): StepDraft[] {
  return onStep(steps, stepUid, (rs) => rs.filter((r) => r.uid !== readingUid));
}

/** Moves a reading one place up (−1) or down (+1) within its step. */
export function moveReading(steps: StepDraft[], stepUid: string, index: number, by: -1 | 1): StepDraft[] {
  return onStep(steps, stepUid, (rs) => swap(rs, index, by));
}

export function updateReading(steps: StepDraft[], stepUid: string, readingUid: string, patch: Partial<Omit<ReadingDraft, "uid">>): StepDraft[] {
  return onStep(steps, stepUid, (rs) => rs.map((r) => (r.uid === readingUid ? { ...r, ...patch } : r)));
}

// ---- what is sent ------------------------------------------------------------------------------

/** "Lacquer coat 9, stoved" → "lacquer-coat-9-stoved": the key a step gets when none is typed. */
export const stepKeyFrom = (text: string): string =>
  text
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 40)
    .replace(/-+$/, "");

/** "Platen temperature" → "platenTemperature": the key a reading gets when none is typed. */
export const readingKeyFrom = (text: string): string => {
  const words = stepKeyFrom(text).split("-").filter(Boolean);
  const out = words
    .map((w, i) => (i === 0 ? w : w[0]!.toUpperCase() + w.slice(1)))
    .join("")
    .replace(/^[0-9]+/, "");
  return out.slice(0, 40);
};

/**
 * A number as typed ("0,2", "−0.15" with a typographic minus); empty is none; anything else goes
 * as typed, so the server refuses it with its own words beside the field.
 */
export function numberOrText(text: string): number | string | undefined {
  const t = text.trim().replace(/^[\u2212\u2013]/, "-").replace(",", ".");
  if (t === "") return undefined;
  const n = Number(t);
  return /^[+-]?(\d+\.?\d*|\.\d+)$/.test(t) && Number.isFinite(n) ? n : text;
}

/** The draft as the steps JSON the server checks; the server numbers the steps 1…n. */
export function toSpec(steps: StepDraft[]): Record<string, unknown>[] {
  return steps.map((s) => {
    const out: Record<string, unknown> = {
      key: s.key.trim() || stepKeyFrom(s.name),
      name: s.name,
      station: s.station,
      readings: s.readings.map((r) => {
        const o: Record<string, unknown> = { key: r.key.trim() || readingKeyFrom(r.label), label: r.label, unit: r.kind === "number" ? r.unit.trim() || null : null, kind: r.kind };
        if (r.kind === "text") {
          const v = numberOrText(r.maxLength);
          if (v !== undefined) o.maxLength = v;
          if (r.lot) o.lot = true;
        }
        if (r.kind === "grit") {
          // "P240" or "240": the grade's number; anything else goes as typed, for the server to refuse.
          for (const k of ["min", "max"] as const) {
            const v = numberOrText(r[k].trim().replace(/^[pP]\s*/, ""));
            if (v !== undefined) o[k] = typeof v === "string" ? r[k] : v;
          }
        }
        if (r.kind === "number") {
          for (const k of LIMITS) {
            const v = numberOrText(r[k]);
            if (v !== undefined) o[k] = v;
          }
        }
        return o;
      }),
    };
    if (s.holdAmount.trim() || s.holdLabel.trim()) {
      const amount = numberOrText(s.holdAmount);
      const hold: Record<string, unknown> = { from: s.holdFrom, label: s.holdLabel };
      // Rounded to a millionth of a minute so 0.1 h is 6 minutes, not 6.000000000000001.
      if (typeof amount === "number") hold.minutes = Math.round(amount * UNIT_MINUTES[s.holdUnit] * 1e6) / 1e6;
      else if (amount !== undefined) hold.minutes = amount;
      out.holdAfter = hold;
    }
    if (s.note.trim()) out.note = s.note;
    return out;
  });
}

/** The window of a reading as typed ("135–140 °C"), or null while a limit is not a number yet. */
export function previewWindow(r: ReadingDraft): string | null {
  if (r.kind === "check") return "pass";
  if (r.kind === "text") return "as written";
  if (r.kind === "grit") {
    const spec: ReadingSpec = { key: "x", label: r.label, unit: null, kind: "grit" };
    for (const k of ["min", "max"] as const) {
      const v = numberOrText(r[k].trim().replace(/^[pP]\s*/, ""));
      if (typeof v === "string") return null;
      if (v !== undefined) spec[k] = v;
    }
    return windowText(spec);
  }
  const spec: ReadingSpec = { key: "x", label: r.label, unit: r.unit.trim() || null, kind: "number" };
  for (const k of LIMITS) {
    const v = numberOrText(r[k]);
    if (typeof v === "string") return null;
    if (v !== undefined) spec[k] = v;
  }
  return windowText(spec);
}

/** The wait after a step as typed ("then wait 2 weeks from when it is recorded: curing"), or null. */
export function previewHold(s: StepDraft): string | null {
  const amount = numberOrText(s.holdAmount);
  if (typeof amount !== "number" || !s.holdLabel.trim()) return null;
  const minutes = Math.round(amount * UNIT_MINUTES[s.holdUnit]);
  return minutes >= 1 ? holdText({ minutes, from: s.holdFrom, label: s.holdLabel.trim() }) : null;
}

// ---- the server's answer, placed back ----------------------------------------------------------

/** Which step and reading sat at each place when the form was sent. */
export interface Layout {
  steps: { uid: string; readings: string[] }[];
}

export function layoutOf(steps: StepDraft[]): Layout {
  return { steps: steps.map((s) => ({ uid: s.uid, readings: s.readings.map((r) => r.uid) })) };
}

export interface PlacedErrors {
  /** Errors of a step or reading by its uid, then by field ("" for the step or reading as a whole). */
  byUid: Map<string, Record<string, string[]>>;
  /** Errors tied to no step: the route as a whole, or a place the form no longer has. */
  general: string[];
  /** How many fields have an error, the note included; those in `general` are not counted. */
  count: number;
}

/**
 * Turns the server's "steps.3.readings.0.max" into the error of that reading's max. The layout is
 * the one sent, so the error stays with its reading even if steps have moved since.
 */
export function placeErrors(fieldErrors: FormState["fieldErrors"], layout: Layout | null): PlacedErrors {
  const byUid = new Map<string, Record<string, string[]>>();
  const general: string[] = [];
  let count = 0;
  const put = (id: string, field: string, msgs: string[]) => {
    const rec = byUid.get(id) ?? {};
    rec[field] = [...(rec[field] ?? []), ...msgs];
    byUid.set(id, rec);
  };
  for (const [key, msgs] of Object.entries(fieldErrors ?? {})) {
    if (!msgs?.length) continue;
    if (key === "note") {
      count++;
      continue;
    }
    const m = /^steps\.(\d+)(?:\.(.+))?$/.exec(key);
    const step = m && layout ? layout.steps[Number(m[1])] : undefined;
    if (!m || !step) {
      general.push(...msgs);
      continue;
    }
    count++;
    const rest = m[2] ?? "";
    const r = /^readings\.(\d+)(?:\.(.+))?$/.exec(rest);
    const reading = r ? step.readings[Number(r[1])] : undefined;
    if (r && reading) put(reading, r[2] ?? "", msgs);
    else put(step.uid, rest, msgs);
  }
  return { byUid, general, count };
}

/** The fields the form shows beside their own inputs; anything else is listed above the step or reading. */
export const STEP_FIELDS: ReadonlySet<string> = new Set(["key", "name", "station", "note", "readings", "holdAfter", "holdAfter.minutes", "holdAfter.from", "holdAfter.label"]);
export const READING_FIELDS: ReadonlySet<string> = new Set(["key", "label", "unit", "kind", "maxLength", "lot", ...LIMITS]);

/** The errors of a step or reading that no input of the form shows. */
export function otherErrors(rec: Record<string, string[]> | undefined, shown: ReadonlySet<string>): string[] {
  return Object.entries(rec ?? {})
    .filter(([k]) => !shown.has(k))
    .flatMap(([, v]) => v);
}
