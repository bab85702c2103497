/**
 * The model spec an item was made under (its pinned model version), and a model's current spec
 * from its rows. Kept apart from the admin's writes so the lab, assembly, packing and the service
 * desk import only this.
 */
import "server-only";
import { asc, desc, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { itemModelVersions, modelCrossoverPositions, modelPositions, models, modelTolerances, modelTrimPositions, modelVersions, packingItems } from "@/db/schema";
import { FIXED_PACKING_ITEMS, sameLabel, withFixedItems } from "@/lib/dispatch/packing-list";
import { isPartType, type PartType } from "@/lib/vocabulary/part-types";
import { canonical, modelColumns, type ModelSpec, type ModelSpecVersion } from "./model-spec";

/** The current spec of a model from its rows (the projection), with its newest version number. */
export async function currentModelSpec(db: DbOrTx, modelId: string): Promise<ModelSpecVersion | null> {
  const [m] = await db.select().from(models).where(eq(models.id, modelId)).limit(1);
  if (!m) return null;
  const [positions, crossovers, trims, tolerances, packing, [latest]] = await Promise.all([
    db.select().from(modelPositions).where(eq(modelPositions.modelId, modelId)),
    db.select().from(modelCrossoverPositions).where(eq(modelCrossoverPositions.modelId, modelId)),
    db.select().from(modelTrimPositions).where(eq(modelTrimPositions.modelId, modelId)),
    db.select().from(modelTolerances).where(eq(modelTolerances.modelId, modelId)),
    db.select({ label: packingItems.label }).from(packingItems).where(eq(packingItems.modelId, modelId)).orderBy(asc(packingItems.position)),
    db.select({ version: modelVersions.version }).from(modelVersions).where(eq(modelVersions.modelId, modelId)).orderBy(desc(modelVersions.version)).limit(1),
  ]);
  const spec = canonical({
    ...modelColumns(m),
    positions: positions.map((p) => ({ position: p.position, partType: p.partType, count: p.count })),
    // A model from before crossover positions were stored has the one board at XO.
    crossovers: crossovers.length ? crossovers.map((c) => ({ position: c.position, count: c.count })) : [{ position: "XO", count: 1 }],
    trimPositions: trims.map((t) => ({ position: t.position, label: t.label, count: t.count })),
    tolerances: tolerances.map((t) => ({ partType: t.partType, mismatchLimitDb: t.mismatchLimitDb })),
    packingList: packing.map((p) => p.label).filter((l) => !FIXED_PACKING_ITEMS.some((f) => sameLabel(f, l))),
  });
  return { ...spec, id: m.id, version: latest?.version ?? 0, active: m.active };
}

/** A stored version's spec, read defensively (it was written by this module or by the migration). */
export function specFromVersion(raw: unknown): ModelSpec {
  const s = (typeof raw === "string" ? JSON.parse(raw) : raw) as Partial<ModelSpec>;
  return canonical({
    code: String(s.code ?? ""),
    name: String(s.name ?? ""),
    leavesPerFace: Number(s.leavesPerFace),
    minLeafLengthMm: Number(s.minLeafLengthMm),
    minLeafWidthMm: Number(s.minLeafWidthMm),
    pairResponseLimitDb: Number(s.pairResponseLimitDb),
    responseMinHz: Number(s.responseMinHz),
    responseMaxHz: Number(s.responseMaxHz),
    pairGtin: String(s.pairGtin ?? ""),
    warrantyMonths: Number(s.warrantyMonths),
    positions: (s.positions ?? []).filter((p) => isPartType(p.partType)).map((p) => ({ position: p.position, partType: p.partType as PartType, count: Number(p.count) })),
    crossovers: s.crossovers?.length ? s.crossovers.map((c) => ({ position: c.position, count: Number(c.count) })) : [{ position: "XO", count: 1 }],
    trimPositions: (s.trimPositions ?? []).map((t) => ({ position: t.position, label: t.label, count: Number(t.count) })),
    tolerances: (s.tolerances ?? []).filter((t) => isPartType(t.partType)).map((t) => ({ partType: t.partType as PartType, mismatchLimitDb: Number(t.mismatchLimitDb) })),
    packingList: (s.packingList ?? []).map(String),
  });
}

/**
 * The model spec an item was made under: the version pinned to it when it was registered, or the
 * model's current spec when it has none (an item of a model with no recorded version). Null for an
 * item without a model. Read this, not the `models` row, wherever a pair in progress is judged.
 */
export async function modelSpecOf(db: DbOrTx, item: { id: string; modelId: string | null }): Promise<ModelSpecVersion | null> {
  if (!item.modelId) return null;
  const [pinned] = await db
    .select({ spec: modelVersions.spec, version: modelVersions.version, active: models.active })
    .from(itemModelVersions)
    .innerJoin(modelVersions, eq(modelVersions.id, itemModelVersions.modelVersionId))
    .innerJoin(models, eq(models.id, modelVersions.modelId))
    .where(eq(itemModelVersions.itemId, item.id))
    .limit(1);
  if (pinned) return { ...specFromVersion(pinned.spec), id: item.modelId, version: pinned.version, active: pinned.active };
  return currentModelSpec(db, item.modelId);
}

/** The packing list of a spec as the packer ticks it: the fixed three first, then the model's lines. */
export function packingListOf(spec: Pick<ModelSpec, "packingList">): string[] {
  return withFixedItems(spec.packingList);
}


/** The packing list of the model version an item (a pair) was made under; empty without a model. */
export async function packingListOfItem(db: DbOrTx, item: { id: string; modelId: string | null }): Promise<string[]> {
  const spec = await modelSpecOf(db, item);
  return spec ? packingListOf(spec) : [];
}
