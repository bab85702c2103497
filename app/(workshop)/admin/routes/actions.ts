"use server";
import { eq } from "drizzle-orm";
import { getDb } from "@/db";
import { models, users } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { guardedAction } from "@/lib/auth/guard";
import { createSpecVersion, currentSpec } from "@/lib/route/server";
import { saveRouteSchema, sameSteps } from "./schemas";

/**
 * Saves an edited route as the model's next version. Pairs that have started keep the version
 * they started under; the versions before stay as they were (the table refuses changes).
 */
export const saveRouteVersionAction = guardedAction("admin.reference", saveRouteSchema, async (input, user) => {
  const db = getDb();
  const [model] = await db.select({ id: models.id, code: models.code }).from(models).where(eq(models.id, input.modelId)).limit(1);
  if (!model) throw new AppError(404, "That model is not in the register. Go back to the routes and choose it again.");
  const current = await currentSpec(db, model.id);
  if ((current?.version ?? 0) !== input.baseVersion) {
    if (!current) throw new AppError(409, `The route of ${model.code} has changed since you opened this form, so yours was not saved. Open the editor again.`);
    const [by] = current.createdBy ? await db.select({ name: users.name }).from(users).where(eq(users.id, current.createdBy)).limit(1) : [];
    throw new AppError(
      409,
      `Version ${current.version} of ${model.code} was saved${by ? ` by ${by.name}` : ""} after you opened this form, so yours was not saved. Open the editor again to start from version ${current.version}.`,
    );
  }
  if (current && sameSteps(current.steps, input.steps)) {
    throw new AppError(400, `Nothing to save: the steps are the same as version ${current.version}. Change a step, or leave the route as it is.`);
  }
  const saved = await createSpecVersion(db, { modelId: model.id, steps: input.steps, note: input.note }, { id: user.id });
  const params = new URLSearchParams({ saved: model.code, version: String(saved.version) });
  return { ok: true, revalidate: ["/admin/routes"], redirectTo: `/admin/routes?${params.toString()}` };
});
