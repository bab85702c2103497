/** A model's route versions: the newest, the history, the default for new models, and saving an edit as a new version. */
import "server-only";
import { and, asc, count, desc, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { models, processSpecs, routeStarts, users, type ProcessSpec } from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { newId } from "@/lib/auth/tokens";
import { appendEvent } from "@/lib/events/queries";
import type { Actor } from "@/lib/vocabulary/actor";
import type { RouteKind } from "@/lib/vocabulary/route-kinds";
import type { Station } from "@/lib/vocabulary/stations";
import { defaultRoute } from "./default-spec";
import { sameSteps } from "./spec-rules";
import type { StepSpec } from "./types";

/** The newest version of a model's route of one kind (its cabinets' route unless told). */
export async function currentSpec(db: DbOrTx, modelId: string, routeKind: RouteKind = "cabinet"): Promise<ProcessSpec | null> {
  const [row] = await db
    .select()
    .from(processSpecs)
    .where(and(eq(processSpecs.modelId, modelId), eq(processSpecs.routeKind, routeKind)))
    .orderBy(desc(processSpecs.version))
    .limit(1);
  return row ?? null;
}

export async function specVersions(db: DbOrTx, modelId: string, routeKind: RouteKind = "cabinet") {
  return db
    .select()
    .from(processSpecs)
    .where(and(eq(processSpecs.modelId, modelId), eq(processSpecs.routeKind, routeKind)))
    .orderBy(desc(processSpecs.version));
}

/** Gives every model without a route the default one as version 1 (the demo seed and new models). */
export async function ensureDefaultSpecs(tx: DbOrTx, actorId: string | null = null, station: Station = "seed"): Promise<number> {
  const all = await tx.select({ id: models.id, code: models.code }).from(models);
  let made = 0;
  for (const m of all) {
    if (await currentSpec(tx, m.id)) continue;
    const id = newId();
    const eventId = await appendEvent(tx, { actorId, station, type: "spec.created", subjectKind: "model", subjectId: m.id, data: { model: m.code, version: 1, steps: defaultRoute().length } });
    await tx.insert(processSpecs).values({ id, modelId: m.id, version: 1, steps: defaultRoute(), note: "The workshop's usual route.", createdBy: actorId, eventId, createdAt: now() });
    made++;
  }
  return made;
}

/**
 * Saves an edit of a route as the model's next version; pairs already started keep theirs. When
 * the editor says which version it started from (`baseVersion`), a version saved meanwhile wins and
 * this one is refused, checked inside the transaction so two admins saving at once cannot both
 * succeed. Steps identical to the current version are refused as nothing to save.
 */
export async function createSpecVersion(db: DbOrTx, input: { modelId: string; steps: StepSpec[]; note: string; baseVersion?: number }, actor: Actor): Promise<ProcessSpec & { modelCode: string }> {
  if (!input.steps.length) throw new AppError(400, "A route needs at least one step.");
  input.steps.forEach((s, i) => {
    if (s.seq !== i + 1) throw new AppError(400, `Step ${i + 1} is numbered ${s.seq}: number the steps 1, 2, 3… in order.`);
  });
  const staleRefusal = async (tx: DbOrTx, code: string) => {
    const latest = await currentSpec(tx, input.modelId);
    if (!latest) return new AppError(409, `The route of ${code} has changed since you opened this form, so yours was not saved. Open the editor again.`);
    const [by] = latest.createdBy ? await tx.select({ name: users.name }).from(users).where(eq(users.id, latest.createdBy)).limit(1) : [];
    return new AppError(
      409,
      `Version ${latest.version} of ${code} was saved${by ? ` by ${by.name}` : ""} after you opened this form, so yours was not saved. Open the editor again to start from version ${latest.version}.`,
    );
  };
  let code = "";
  // The check and the write are one BEGIN IMMEDIATE transaction (libSQL's "write" mode), taken in
  // turn within this process (withWriteLock); should another process still write the same version
  // first, the unique (model, kind, version) index refuses this one and it gets the same answer.
  return db.transaction(async (tx) => {
    const [model] = await tx.select({ code: models.code, active: models.active }).from(models).where(eq(models.id, input.modelId)).limit(1);
    if (!model) throw new AppError(404, "That model is not in the register. Go back to the routes and choose it again.");
    code = model.code;
    if (!model.active) throw new AppError(409, `${model.code} is retired, so its route takes no new versions. Bring the model back under Administration → Models first.`);
    const latest = await currentSpec(tx, input.modelId);
    if (input.baseVersion !== undefined && (latest?.version ?? 0) !== input.baseVersion) throw await staleRefusal(tx, model.code);
    if (latest && sameSteps(latest.steps, input.steps)) {
      throw new AppError(400, `Nothing to save: the steps are the same as version ${latest.version}. Change a step, or leave the route as it is.`);
    }
    const version = (latest?.version ?? 0) + 1;
    const id = newId();
    const eventId = await appendEvent(tx, { actorId: actor.id, station: "admin", type: "spec.created", subjectKind: "model", subjectId: input.modelId, data: { model: model.code, code: model.code, version, steps: input.steps.length, note: input.note } });
    const [row] = await tx.insert(processSpecs).values({ id, modelId: input.modelId, version, steps: input.steps, note: input.note, createdBy: actor.id, eventId, createdAt: now() }).returning();
    return { ...row!, modelCode: model.code };
  }).catch(async (e: unknown) => {
    if (isConstraintError(e, "UNIQUE")) throw await staleRefusal(db, code);
    throw e;
  });
}

export interface RouteVersion {
  spec: ProcessSpec;
  /** Who saved it; null for Twinleaf's own default. */
  by: string | null;
  /** How many pairs started their route under it. */
  pairs: number;
}

/** Every active model with its route versions, newest first: what the routes page lists. */
export async function routesOverview(db: DbOrTx): Promise<{ model: { id: string; code: string; name: string }; versions: RouteVersion[] }[]> {
  const active = await db.select({ id: models.id, code: models.code, name: models.name }).from(models).where(eq(models.active, true)).orderBy(asc(models.code));
  const specs = await db.select({ spec: processSpecs, by: users.name }).from(processSpecs).leftJoin(users, eq(users.id, processSpecs.createdBy)).where(eq(processSpecs.routeKind, "cabinet")).orderBy(asc(processSpecs.modelId), desc(processSpecs.version));
  const starts = await db.select({ specId: routeStarts.specId, n: count() }).from(routeStarts).groupBy(routeStarts.specId);
  const pairsOn = new Map(starts.map((s) => [s.specId, Number(s.n)]));
  return active.map((model) => ({
    model,
    versions: specs.filter((s) => s.spec.modelId === model.id).map((s) => ({ spec: s.spec, by: s.by, pairs: pairsOn.get(s.spec.id) ?? 0 })),
  }));
}

/** What the route editor opens on: the model by its code, its current version, who saved it and how many pairs are on it. */
export async function routeEditorContext(db: DbOrTx, modelCode: string) {
  const [model] = await db.select({ id: models.id, code: models.code, name: models.name }).from(models).where(eq(models.code, modelCode)).limit(1);
  if (!model) return null;
  const current = await currentSpec(db, model.id);
  const [by] = current?.createdBy ? await db.select({ name: users.name }).from(users).where(eq(users.id, current.createdBy)).limit(1) : [];
  const [started] = current ? await db.select({ n: count() }).from(routeStarts).where(eq(routeStarts.specId, current.id)) : [];
  return { model, current, savedBy: by?.name ?? null, pairs: Number(started?.n ?? 0) };
}
