"use server";
import { getDb } from "@/db";
import { guardedAction } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { createSpecVersion } from "@/lib/route/specs";
import { saveRouteSchema } from "./schemas";

/**
 * Saves an edited route as the model's next version. Pairs that have started keep the version
 * they started under; the versions before stay as they were (the table refuses changes).
 */
export const saveRouteVersionAction = guardedAction("admin.reference", saveRouteSchema, async (input, user) => {
  const saved = await createSpecVersion(getDb(), { modelId: input.modelId, routeKind: input.routeKind, steps: input.steps, note: input.note, baseVersion: input.baseVersion }, { id: user.id });
  return { ok: true, revalidate: [paths.adminRoutes], redirectTo: `${paths.adminRoutes}?${new URLSearchParams({ saved: saved.modelCode, version: String(saved.version), kind: input.routeKind }).toString()}` };
});
