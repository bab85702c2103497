/**
 * The model form, checked on the server: scalar fields as typed, the position lists and packing
 * list as JSON in hidden fields (the form edits them as rows). Every problem is reported at once,
 * keyed by its place ("positions.1.position"), so the form shows it beside its row.
 */
import { z } from "zod";
import { modelSpecSchema } from "@/lib/workshop/model-spec";

const text = z.string().optional().default("");

const formSchema = z.object({
  modelId: text,
  baseVersion: text,
  code: text,
  name: text,
  leavesPerFace: text,
  minLeafLengthMm: text,
  minLeafWidthMm: text,
  pairResponseLimitDb: text,
  responseMinHz: text,
  responseMaxHz: text,
  pairGtin: text,
  warrantyMonths: text,
  positions: text,
  crossovers: text,
  trimPositions: text,
  tolerances: text,
  packingList: text,
  note: text,
});

const LISTS = ["positions", "crossovers", "trimPositions", "tolerances"] as const;

/** One schema for a new model (no modelId) and an edit (modelId and the version it was opened on). */
export const modelFormSchema = formSchema.transform((raw, ctx) => {
  const add = (key: string, message: string) => ctx.addIssue({ code: "custom", message, path: [key] });
  const lists: Record<string, unknown> = {};
  for (const key of LISTS) {
    try {
      lists[key] = raw[key] === "" ? [] : JSON.parse(raw[key]);
    } catch {
      add(key, "This list did not arrive whole. Reload the page and try again.");
    }
  }
  const editing = raw.modelId.trim() !== "";
  const baseVersion = /^\d{1,6}$/.test(raw.baseVersion) ? Number(raw.baseVersion) : null;
  if (editing && baseVersion === null) add("baseVersion", "The form does not say which version it edits. Reload the page and try again.");
  const note = raw.note.trim();
  if (editing && note.length < 5) add("note", "Say why the model changes, in a few words: it is kept with the version.");
  if (note.length > 500) add("note", "Keep the note under 500 characters.");
  // The packing list is typed one line per item.
  const packingList = raw.packingList.split(/\r?\n/).map((l) => l.trim()).filter(Boolean);
  const parsed = modelSpecSchema.safeParse({ ...raw, ...lists, packingList });
  if (!parsed.success) {
    const seen = new Set<string>();
    for (const i of parsed.error.issues) {
      const key = i.path.map(String).join(".") || "code";
      if (seen.has(`${key}\n${i.message}`)) continue;
      seen.add(`${key}\n${i.message}`);
      add(key, i.message);
    }
    return z.NEVER;
  }
  return { modelId: editing ? raw.modelId.trim() : null, baseVersion: baseVersion ?? 0, note, spec: parsed.data };
});

export const retireModelSchema = z.object({
  modelId: z.string({ error: "Choose a model." }).trim().min(1, "Choose a model."),
  active: z.enum(["true", "false"], { error: "Say whether to retire or restore it." }).transform((v) => v === "true"),
  reason: z.string({ error: "Say why." }).trim().min(3, "Say why, in a few words: it is kept in the model's history.").max(500, "Keep the reason under 500 characters."),
});
