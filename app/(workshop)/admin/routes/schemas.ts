/**
 * The route editor's form, checked on the server: the steps arrive as JSON in one hidden field and
 * are checked against the spec rules (lib/route/spec-rules.ts). Every problem is reported at once,
 * keyed by its place in the form ("steps.3.readings.0.max"), so the editor can show it beside the field.
 */
import { z } from "zod";
import { duplicateKeyIssues, stepsSchema } from "@/lib/route/spec-rules";
import { ROUTE_KINDS } from "@/lib/vocabulary/route-kinds";

const stepsJson = z
  .string({ error: "The steps are missing. Reload the page and try again." })
  .transform((text, ctx) => {
    try {
      return JSON.parse(text) as unknown;
    } catch {
      ctx.addIssue({ code: "custom", message: "The steps did not arrive whole. Reload the page and try again." });
      return z.NEVER;
    }
  })
  .pipe(stepsSchema);

const formSchema = z.object({
  modelId: z.string({ error: "Choose a model." }).trim().min(1, "Choose a model."),
  /** Which of the model's routes: its cabinets' (the default) or its trim parts'. */
  routeKind: z.enum(ROUTE_KINDS, { error: "The form does not say which route it edits. Reload the page and try again." }).default("cabinet"),
  /** The version the form was opened on, so an edit made meanwhile is not silently overwritten. */
  baseVersion: z
    .string({ error: "The form does not say which version it edits. Reload the page and try again." })
    .regex(/^\d{1,6}$/, "The form does not say which version it edits. Reload the page and try again.")
    .transform(Number),
  note: z
    .string({ error: "Say why the route changes." })
    .trim()
    .min(5, "Say why the route changes, in a few words: it is kept with the version.")
    .max(500, "Keep the note under 500 characters."),
  steps: stepsJson,
});

/**
 * What guardedAction checks. zod's flattened errors keep only the first segment of a path, so
 * the issues are re-raised here with the whole path as one key: "steps.3.readings.0.max".
 */
export const saveRouteSchema = z.unknown().transform((raw, ctx): z.output<typeof formSchema> => {
  const parsed = formSchema.safeParse(raw);
  if (parsed.success) return parsed.data;
  const issues = parsed.error.issues.map((i) => ({ key: i.path.map(String).join(".") || "steps", message: i.message }));
  // The duplicate check is skipped by zod when a step has other problems: run it on what arrived.
  const text = raw && typeof raw === "object" ? (raw as { steps?: unknown }).steps : undefined;
  if (typeof text === "string") {
    let steps: unknown = null;
    try {
      steps = JSON.parse(text);
    } catch {
      // reported by the schema already
    }
    for (const d of duplicateKeyIssues(steps)) issues.push({ key: ["steps", ...d.path].join("."), message: d.message });
  }
  const seen = new Set<string>();
  for (const { key, message } of issues) {
    if (seen.has(`${key}\n${message}`)) continue;
    seen.add(`${key}\n${message}`);
    ctx.addIssue({ code: "custom", message, path: [key] });
  }
  return z.NEVER;
});

export type SaveRouteInput = z.output<typeof formSchema>;
