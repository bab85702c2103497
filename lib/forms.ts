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

/**
 * Fields whose value is never sent back to the browser: passwords, their confirmation, tokens,
 * secrets. Wrap the field's finished schema: `password: secret(z.string().min(12))`.
 */
export const secretFields = z.registry<{ secret: true }>();
export function secret<T extends z.ZodType>(schema: T): T {
  secretFields.add(schema, { secret: true });
  return schema;
}

/** A second net under the registry: a field named like a secret is never echoed, declared or not. */
const SECRET_NAME = /pass|token|secret|confirm|credential/i;

/** Which fields of a form may be echoed: those its schema declares (not secret), and others only if it passes them through. */
export interface EchoPlan {
  fields: ReadonlySet<string>;
  undeclared: boolean;
}

/** The object schema inside `schema` (through preprocess, transforms, defaults), or null. */
function objectOf(schema: z.ZodType): z.ZodObject | null {
  if (schema instanceof z.ZodObject) return schema;
  if (schema instanceof z.ZodPipe) return objectOf(schema.in as z.ZodType) ?? objectOf(schema.out as z.ZodType);
  if (schema instanceof z.ZodDefault || schema instanceof z.ZodOptional || schema instanceof z.ZodNullable) return objectOf(schema.unwrap() as z.ZodType);
  return null;
}

/** The allow-list of a form's schema: an object's non-secret fields; nothing for any other schema. */
export function echoPlan(schema: z.ZodType): EchoPlan {
  const object = objectOf(schema);
  if (!object) return { fields: new Set(), undeclared: false };
  const fields = Object.entries(object.shape as Record<string, z.ZodType>)
    .filter(([name, field]) => !secretFields.has(field) && !SECRET_NAME.test(name))
    .map(([name]) => name);
  const catchall = object._zod.def.catchall;
  return { fields: new Set(fields), undeclared: catchall !== undefined && !(catchall instanceof z.ZodNever) };
}

/**
 * What the user typed, sent back into the form (React 19 resets uncontrolled inputs after an
 * action): only the fields `plan` allows, and never one named like a secret.
 */
export function echoValues(raw: Record<string, string | string[]>, plan: EchoPlan): Record<string, string | string[]> {
  return Object.fromEntries(Object.entries(raw).filter(([k]) => !SECRET_NAME.test(k) && (plan.fields.has(k) || plan.undeclared)));
}

/** A checkbox group arrives as nothing, one string or several: always give an array. */
export const stringList = <T extends z.ZodType>(item: T) =>
  z.preprocess((v) => (v === undefined || v === "" ? [] : Array.isArray(v) ? v : [v]), z.array(item));

// The form state lives in a module of its own without zod, so client forms that import it do
// not carry zod into their first load (every page of the shell has the sign-out form).
export { initialFormState, type FormState } from "./form-state";
