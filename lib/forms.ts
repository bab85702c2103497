import { z } from "zod";

/** FormData to a plain object: repeated keys become arrays; Next's internal fields are dropped. */
export function formDataToObject(formData: FormData): Record<string, string | string[]> {
  const out: Record<string, string | string[]> = {};
  for (const key of new Set(formData.keys())) {
    if (key.startsWith("$ACTION")) continue;
    const values = formData.getAll(key).filter((v): v is string => typeof v === "string");
    out[key] = values.length === 1 ? values[0]! : values;
  }
  return out;
}

/** Echoes what the user typed back into the form, never a password or token. */
export function echoValues(raw: Record<string, string | string[]>): Record<string, string | string[]> {
  return Object.fromEntries(Object.entries(raw).filter(([k]) => !/password|token|secret/i.test(k)));
}

/** A checkbox group arrives as nothing, one string or several: always give an array. */
export const stringList = <T extends z.ZodType>(item: T) =>
  z.preprocess((v) => (v === undefined || v === "" ? [] : Array.isArray(v) ? v : [v]), z.array(item));

export interface FormState {
  ok: boolean;
  status?: number;
  message?: string;
  fieldErrors?: Record<string, string[] | undefined>;
  values?: Record<string, string | string[]>;
  /** What a successful action hands back to show once, e.g. a new machine token. Never user input. */
  data?: Record<string, string>;
}

export const initialFormState: FormState = { ok: false };
