/** A model's route versions: the newest, the history, the default for new models, and saving an edit as a new version. */
import "server-only";
import { and, asc, count, desc, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { models, modelTrimPositions, processSpecs, routeStarts, users, type ProcessSpec } from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { newId } from "@/lib/auth/tokens";
import { appendEvent } from "@/lib/events/queries";
import type { Actor } from "@/lib/vocabulary/actor";
import { ROUTE_KIND_LABEL, type RouteKind } from "@/lib/vocabulary/route-kinds";
import type { Station } from "@/lib/vocabulary/stations";
import { defaultRoute, defaultTrimRoute } from "./default-spec";
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

/**
 * Gives every model without a route the default one as version 1 (the demo seed and new models),
 * and every model with trim positions but no trim route the default trim route.
 */
export async function ensureDefaultSpecs(tx: DbOrTx, actorId: string | null = null, station: Station = "seed"): Promise<number> {
  const all = await tx.select({ id: models.id, code: models.code }).from(models);
  const withTrim = new Set((await tx.selectDistinct({ id: modelTrimPositions.modelId }).from(modelTrimPositions)).map((r) => r.id));
  let made = 0;
  for (const m of all) {
    for (const routeKind of ["cabinet", "trim"] as const) {
      if (routeKind === "trim" && !withTrim.has(m.id)) continue;
      if (await currentSpec(tx, m.id, routeKind)) continue;
      const steps = routeKind === "trim" ? defaultTrimRoute() : defaultRoute();
      const id = newId();
      const eventId = await appendEvent(tx, { actorId, station, type: "spec.created", subjectKind: "model", subjectId: m.id, data: { model: m.code, version: 1, steps: steps.length, routeKind } });
      await tx.insert(processSpecs).values({ id, modelId: m.id, routeKind, version: 1, steps, note: routeKind === "trim" ? "The workshop's usual trim-part route." : "The workshop's usual route.", createdBy: actorId, eventId, createdAt: now() });
      made++;
    }
  }
  return made;
}

/**
 * Saves an edit of a route as the model's next version; pairs already started keep theirs. When
 * the editor says which version it started from (`baseVersion`), a version saved meanwhile wins and
 * this one is refused, checked inside the transaction so two admins saving at once cannot both
 * succeed. Steps identical to the current version are refused as nothing to save.
 */
export async function createSpecVersion(
  db: DbOrTx,
  input: { modelId: string; routeKind?: RouteKind; steps: StepSpec[]; note: string; baseVersion?: number },
  actor: Actor,
): Promise<ProcessSpec & { modelCode: string }> {
  const routeKind = input.routeKind ?? "cabinet";
  if (!input.steps.length) throw new AppError(400, "A route needs at least one step.");
  input.steps.forEach((s, i) => {
    if (s.seq !== i + 1) throw new AppError(400, `Step ${i + 1} is numbered ${s.seq}: number the steps 1, 2, 3… in order.`);
  });
  const staleRefusal = async (tx: DbOrTx, code: string) => {
    const latest = await currentSpec(tx, input.modelId, routeKind);
    if (!latest) return new AppError(409, `The ${ROUTE_KIND_LABEL[routeKind].toLowerCase()} of ${code} has changed since you opened this form, so yours was not saved. Open the editor again.`);
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
    const latest = await currentSpec(tx, input.modelId, routeKind);
    if (input.baseVersion !== undefined && (latest?.version ?? 0) !== input.baseVersion) throw await staleRefusal(tx, model.code);
    if (latest && sameSteps(latest.steps, input.steps)) {
      throw new AppError(400, `Nothing to save: the steps are the same as version ${latest.version}. Change a step, or leave the route as it is.`);
    }
    const version = (latest?.version ?? 0) + 1;
    const id = newId();
    const eventId = await appendEvent(tx, { actorId: actor.id, station: "admin", type: "spec.created", subjectKind: "model", subjectId: input.modelId, data: { model: model.code, code: model.code, version, steps: input.steps.length, note: input.note, routeKind } });
    const [row] = await tx.insert(processSpecs).values({ id, modelId: input.modelId, routeKind, version, steps: input.steps, note: input.note, createdBy: actor.id, eventId, createdAt: now() }).returning();
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

/**
 * Every active model with its route versions of each kind, newest first: what the routes page
 * lists. `hasTrim`: the model has trim positions, so a trim route applies to it.
 */
export async function routesOverview(db: DbOrTx): Promise<{ model: { id: string; code: string; name: string }; hasTrim: boolean; versions: RouteVersion[]; trimVersions: RouteVersion[] }[]> {
  const active = await db.select({ id: models.id, code: models.code, name: models.name }).from(models).where(eq(models.active, true)).orderBy(asc(models.code));
  const specs = await db.select({ spec: processSpecs, by: users.name }).from(processSpecs).leftJoin(users, eq(users.id, processSpecs.createdBy)).orderBy(asc(processSpecs.modelId), desc(processSpecs.version));
  const starts = await db.select({ specId: routeStarts.specId, n: count() }).from(routeStarts).groupBy(routeStarts.specId);
  const withTrim = new Set((await db.selectDistinct({ id: modelTrimPositions.modelId }).from(modelTrimPositions)).map((r) => r.id));
  const pairsOn = new Map(starts.map((s) => [s.specId, Number(s.n)]));
  const of = (modelId: string, kind: RouteKind) => specs.filter((s) => s.spec.modelId === modelId && s.spec.routeKind === kind).map((s) => ({ spec: s.spec, by: s.by, pairs: pairsOn.get(s.spec.id) ?? 0 }));
  return active.map((model) => ({ model, hasTrim: withTrim.has(model.id), versions: of(model.id, "cabinet"), trimVersions: of(model.id, "trim") }));
}

/** What the route editor opens on: the model by its code, its current version of the kind, who saved it and how many items are on it. */
export async function routeEditorContext(db: DbOrTx, modelCode: string, routeKind: RouteKind = "cabinet") {
  const [model] = await db.select({ id: models.id, code: models.code, name: models.name }).from(models).where(eq(models.code, modelCode)).limit(1);
  if (!model) return null;
  const current = await currentSpec(db, model.id, routeKind);
  const [by] = current?.createdBy ? await db.select({ name: users.name }).from(users).where(eq(users.id, current.createdBy)).limit(1) : [];
  const [started] = current ? await db.select({ n: count() }).from(routeStarts).where(eq(routeStarts.specId, current.id)) : [];
  return { model, routeKind, current, savedBy: by?.name ?? null, pairs: Number(started?.n ?? 0) };
}
