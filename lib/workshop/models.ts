/**
 * Models as the admin keeps them: every save is a new model version (model_versions, appended);
 * the `models` row and its position, tolerance, trim and packing rows are rewritten as the current
 * version, which new work reads. An item keeps the version it was made under (item_model_versions,
 * written by a trigger on items), read through `modelSpecOf`.
 */
import "server-only";
import { and, asc, count, desc, eq, inArray, sql } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db";
import { itemModelVersions, items, modelCrossoverPositions, modelPositions, models, modelTolerances, modelTrimPositions, modelVersions, packingItems, users } from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { ensureDefaultSpecs } from "@/lib/route/specs";
import type { Actor } from "@/lib/vocabulary/actor";
import { canonical, changedFields, modelColumns, sameSpec, type ModelSpec, type ModelSpecVersion } from "./model-spec";
import { currentModelSpec, packingListOf, specFromVersion } from "./model-spec-of";

export { currentModelSpec, modelSpecOf, packingListOf } from "./model-spec-of";

/** Writes the current-version rows of a model from its spec (the model row itself is written by the caller). */
async function writeProjection(tx: DbOrTx, modelId: string, spec: ModelSpec) {
  await tx.delete(modelPositions).where(eq(modelPositions.modelId, modelId));
  await tx.delete(modelCrossoverPositions).where(eq(modelCrossoverPositions.modelId, modelId));
  await tx.delete(modelTrimPositions).where(eq(modelTrimPositions.modelId, modelId));
  await tx.delete(modelTolerances).where(eq(modelTolerances.modelId, modelId));
  // An accessory's scan code (lib/dispatch/packing-list.ts) stays with its line across versions.
  const coded = await tx.select({ label: packingItems.label, code: packingItems.code }).from(packingItems).where(eq(packingItems.modelId, modelId));
  const codeOf = new Map(coded.filter((r) => r.code).map((r) => [r.label.trim().toLowerCase(), r.code]));
  await tx.delete(packingItems).where(eq(packingItems.modelId, modelId));
  if (spec.positions.length) await tx.insert(modelPositions).values(spec.positions.map((p) => ({ modelId, ...p })));
  if (spec.crossovers.length) await tx.insert(modelCrossoverPositions).values(spec.crossovers.map((c) => ({ modelId, ...c })));
  if (spec.trimPositions.length) await tx.insert(modelTrimPositions).values(spec.trimPositions.map((t) => ({ modelId, ...t })));
  if (spec.tolerances.length) await tx.insert(modelTolerances).values(spec.tolerances.map((t) => ({ modelId, ...t })));
  const list = packingListOf(spec);
  await tx.insert(packingItems).values(list.map((label, i) => ({ modelId, position: i + 1, label, code: codeOf.get(label.trim().toLowerCase()) ?? null })));
}


const codeTaken = (code: string) => new AppError(409, `There is already a model with the code ${code}.`, { code: [`${code} is taken by another model: choose another code.`] });

/** Registers a new model as version 1 with the workshop's usual cabinet route. */
export async function createModel(db: Db, input: { spec: ModelSpec; note: string }, actor: Actor): Promise<{ id: string; code: string; version: number }> {
  const spec = canonical(input.spec);
  try {
    return await db.transaction(async (tx) => {
      const [taken] = await tx.select({ id: models.id }).from(models).where(eq(models.code, spec.code)).limit(1);
      if (taken) throw codeTaken(spec.code);
      const id = newId();
      await tx.insert(models).values({ id, ...modelColumns(spec), active: true });
      await writeProjection(tx, id, spec);
      const eventId = await appendEvent(tx, { actorId: actor.id, station: "admin", type: "model.created", subjectKind: "model", subjectId: id, data: { code: spec.code, version: 1, spec }, reason: input.note || null });
      await tx.insert(modelVersions).values({ id: newId(), modelId: id, version: 1, spec: { ...spec }, note: input.note, createdBy: actor.id, createdAt: now(), eventId });
      await ensureDefaultSpecs(tx, actor.id, "admin");
      return { id, code: spec.code, version: 1 };
    });
  } catch (e) {
    if (isConstraintError(e, "UNIQUE")) throw codeTaken(spec.code);
    throw e;
  }
}

/** Who saved a model's version, for the refusal of a save made on an older one. */
async function savedBy(db: DbOrTx, createdBy: string | null): Promise<string> {
  if (!createdBy) return "";
  const [u] = await db.select({ name: users.name }).from(users).where(eq(users.id, createdBy)).limit(1);
  return u ? ` by ${u.name}` : "";
}

/**
 * Saves an edit of a model as its next version, refused when another version was saved since the
 * form was opened (`baseVersion`). The check and the write are one transaction, and the unique
 * (model, version) index refuses a second writer that got past the check on another connection.
 * The code cannot change once any item carries the model: it is inside their serials.
 */
export async function saveModelVersion(db: Db, input: { modelId: string; spec: ModelSpec; note: string; baseVersion: number }, actor: Actor): Promise<{ code: string; version: number; changed: string[] }> {
  const spec = canonical(input.spec);
  const stale = async (tx: DbOrTx, code: string) => {
    const [latest] = await tx.select().from(modelVersions).where(eq(modelVersions.modelId, input.modelId)).orderBy(desc(modelVersions.version)).limit(1);
    return new AppError(
      409,
      `Version ${latest?.version ?? "?"} of ${code} was saved${latest ? await savedBy(tx, latest.createdBy) : ""} after you opened this form, so yours was not saved. Open the model again to start from version ${latest?.version ?? "?"}.`,
    );
  };
  let code = "";
  try {
    return await db.transaction(async (tx) => {
      const current = await currentModelSpec(tx, input.modelId);
      if (!current) throw new AppError(404, "That model is not in the register. Go back to the models and choose it again.");
      code = current.code;
      if (current.version !== input.baseVersion) throw await stale(tx, current.code);
      if (sameSpec(current, spec)) throw new AppError(400, `Nothing to save: the model is the same as version ${current.version}. Change a field, or leave the model as it is.`);
      if (spec.code !== current.code) {
        const [used] = await tx.select({ n: count() }).from(items).where(eq(items.modelId, input.modelId));
        if (Number(used?.n ?? 0) > 0) {
          throw new AppError(409, `The code of ${current.code} cannot change: ${used!.n} serials already carry it.`, { code: [`${current.code} is inside the serials already made, so it stays.`] });
        }
        const [taken] = await tx.select({ id: models.id }).from(models).where(eq(models.code, spec.code)).limit(1);
        if (taken) throw codeTaken(spec.code);
      }
      const version = current.version + 1;
      const changed = changedFields(current, spec);
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station: "admin",
        type: "model.changed",
        subjectKind: "model",
        subjectId: input.modelId,
        data: { code: spec.code, version, changed, spec },
        reason: input.note,
      });
      await tx.insert(modelVersions).values({ id: newId(), modelId: input.modelId, version, spec: { ...spec }, note: input.note, createdBy: actor.id, createdAt: now(), eventId });
      await tx.update(models).set(modelColumns(spec)).where(eq(models.id, input.modelId));
      await writeProjection(tx, input.modelId, spec);
      // A model given its first trim position here gets the workshop's usual trim route as version 1.
      await ensureDefaultSpecs(tx, actor.id, "admin");
      return { code: spec.code, version, changed };
    });
  } catch (e) {
    // Another connection wrote the same version number first: the same refusal as the check above.
    if (isConstraintError(e, "UNIQUE") && /model_versions/.test(String((e as Error).message) + String((e as { cause?: Error }).cause?.message ?? ""))) throw await stale(db, code || spec.code);
    if (isConstraintError(e, "UNIQUE")) throw codeTaken(spec.code);
    throw e;
  }
}

/** Retires a model from new work (pickers no longer offer it) or brings it back; its history stays. */
export async function setModelActive(db: Db, input: { modelId: string; active: boolean; reason: string }, actor: Actor): Promise<{ code: string }> {
  return db.transaction(async (tx) => {
    const [m] = await tx.select().from(models).where(eq(models.id, input.modelId)).limit(1);
    if (!m) throw new AppError(404, "That model is not in the register.");
    if (m.active === input.active) throw new AppError(409, `${m.code} is already ${m.active ? "in use" : "retired"}.`);
    await tx.update(models).set({ active: input.active }).where(eq(models.id, m.id));
    await appendEvent(tx, { actorId: actor.id, station: "admin", type: input.active ? "model.restored" : "model.retired", subjectKind: "model", subjectId: m.id, data: { code: m.code }, reason: input.reason });
    return { code: m.code };
  });
}

export interface ModelListRow {
  id: string;
  code: string;
  name: string;
  active: boolean;
  version: number;
  savedAt: Date | null;
  positions: number;
  trimPositions: number;
  pairGtin: string;
  warrantyMonths: number;
  items: number;
}

/** Every model for the admin's list: its current version, when it was saved, and how many items carry it. */
export async function modelsForAdmin(db: DbOrTx): Promise<ModelListRow[]> {
  const rows = await db.select().from(models).orderBy(asc(models.code));
  const [versions, positions, trims, used] = await Promise.all([
    db.select({ modelId: modelVersions.modelId, version: sql<number>`max(${modelVersions.version})`, at: sql<number>`max(${modelVersions.createdAt})` }).from(modelVersions).groupBy(modelVersions.modelId),
    db.select({ modelId: modelPositions.modelId, n: count() }).from(modelPositions).groupBy(modelPositions.modelId),
    db.select({ modelId: modelTrimPositions.modelId, n: count() }).from(modelTrimPositions).groupBy(modelTrimPositions.modelId),
    db.select({ modelId: items.modelId, n: count() }).from(items).where(inArray(items.kind, ["pair", "cabinet", "trim_part"])).groupBy(items.modelId),
  ]);
  const by = <T extends { modelId: string | null }>(xs: T[]) => new Map(xs.map((x) => [x.modelId, x]));
  const v = by(versions);
  const p = by(positions);
  const t = by(trims);
  const u = by(used);
  return rows.map((m) => ({
    id: m.id,
    code: m.code,
    name: m.name,
    active: m.active,
    version: Number(v.get(m.id)?.version ?? 0),
    savedAt: v.get(m.id)?.at ? new Date(Number(v.get(m.id)!.at)) : null,
    positions: Number(p.get(m.id)?.n ?? 0),
    trimPositions: Number(t.get(m.id)?.n ?? 0),
    pairGtin: m.pairGtin,
    warrantyMonths: m.warrantyMonths,
    items: Number(u.get(m.id)?.n ?? 0),
  }));
}

export interface ModelHistoryRow {
  version: number;
  at: Date;
  by: string | null;
  note: string;
  changed: string[];
  /** Pairs, cabinets and trim parts made under this version. */
  items: number;
}

/** A model by its code with its current spec and its versions, newest first. */
export async function modelPage(db: DbOrTx, code: string): Promise<{ spec: ModelSpecVersion; history: ModelHistoryRow[]; itemsUsing: number } | null> {
  const [m] = await db.select({ id: models.id }).from(models).where(eq(models.code, code.trim().toUpperCase())).limit(1);
  if (!m) return null;
  const spec = await currentModelSpec(db, m.id);
  if (!spec) return null;
  const versions = await db
    .select({ v: modelVersions, by: users.name })
    .from(modelVersions)
    .leftJoin(users, eq(users.id, modelVersions.createdBy))
    .where(eq(modelVersions.modelId, m.id))
    .orderBy(asc(modelVersions.version));
  const pinned = await db
    .select({ versionId: itemModelVersions.modelVersionId, n: count() })
    .from(itemModelVersions)
    .innerJoin(items, eq(items.id, itemModelVersions.itemId))
    .where(and(eq(items.modelId, m.id), inArray(items.kind, ["pair", "cabinet", "trim_part"])))
    .groupBy(itemModelVersions.modelVersionId);
  const perVersion = new Map(pinned.map((p) => [p.versionId, Number(p.n)]));
  const [used] = await db.select({ n: count() }).from(items).where(eq(items.modelId, m.id));
  const history: ModelHistoryRow[] = versions.map((row, i) => ({
    version: row.v.version,
    at: row.v.createdAt,
    by: row.by,
    note: row.v.note,
    changed: i === 0 ? [] : changedFields(specFromVersion(versions[i - 1]!.v.spec), specFromVersion(row.v.spec)),
    items: perVersion.get(row.v.id) ?? 0,
  }));
  return { spec, history: history.reverse(), itemsUsing: Number(used?.n ?? 0) };
}

/** Gives every model without a recorded version its current rows as version 1 (the demo seed). */
export async function ensureModelVersions(tx: DbOrTx, actorId: string | null = null): Promise<number> {
  const bare = await tx.select({ id: models.id }).from(models).where(sql`NOT EXISTS (SELECT 1 FROM model_versions v WHERE v.model_id = ${models.id})`);
  for (const m of bare) {
    const spec = await currentModelSpec(tx, m.id);
    if (!spec) continue;
    const { id: _id, version: _v, active: _a, ...plain } = spec;
    await tx.insert(modelVersions).values({ id: newId(), modelId: m.id, version: 1, spec: { ...plain }, note: "The model as first registered.", createdBy: actorId, createdAt: now(), eventId: null });
  }
  return bare.length;
}
