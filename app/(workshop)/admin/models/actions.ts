"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { createModel, saveModelVersion, setModelActive } from "@/lib/workshop/models";
import { modelFormSchema, retireModelSchema } from "./schemas";

/** A new model (version 1), or an edit saved as the model's next version. */
export const saveModelAction = guardedAction("admin.reference", modelFormSchema, async (input, user) => {
  if (!input.modelId) {
    const made = await createModel(getDb(), { spec: input.spec, note: input.note }, { id: user.id });
    return { ok: true, message: `${made.code} registered as version 1.`, revalidate: [paths.adminModels], redirectTo: paths.adminModel(made.code) };
  }
  const saved = await saveModelVersion(getDb(), { modelId: input.modelId, spec: input.spec, note: input.note, baseVersion: input.baseVersion }, { id: user.id });
  return { ok: true, message: `Version ${saved.version} of ${saved.code} saved.`, revalidate: [paths.adminModels, paths.adminModel(saved.code)], redirectTo: `${paths.adminModel(saved.code)}?saved=${saved.version}` };
});

/** Retires a model from new work, or brings it back, with the reason. */
export const retireModelAction = guardedAction("admin.reference", retireModelSchema, async (input, user) => {
  const { code } = await setModelActive(getDb(), { modelId: input.modelId, active: input.active, reason: input.reason }, { id: user.id });
  return { ok: true, message: input.active ? `${code} is back in use.` : `${code} is retired: new work no longer offers it.`, revalidate: [paths.adminModels, paths.adminModel(code)] };
});
