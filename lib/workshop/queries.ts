import "server-only";
import { asc, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { dealers, finishes, modelPositions, models, modelTolerances } from "@/db/schema";

export interface ModelSummary {
  id: string;
  code: string;
  name: string;
  leavesPerFace: number;
  minLeafLengthMm: number;
  minLeafWidthMm: number;
  pairResponseLimitDb: number;
  responseMinHz: number;
  responseMaxHz: number;
  pairGtin: string;
  active: boolean;
  positions: { position: string; partType: string; count: number }[];
  tolerances: { partType: string; mismatchLimitDb: number }[];
}

/** Every model with its drive-unit positions and tolerances (three queries, joined here). */
export async function listModels(db: DbOrTx): Promise<ModelSummary[]> {
  const [rows, positions, tolerances] = await Promise.all([
    db.select().from(models).orderBy(asc(models.code)),
    db.select().from(modelPositions).orderBy(asc(modelPositions.position)),
    db.select().from(modelTolerances).orderBy(asc(modelTolerances.partType)),
  ]);
  return rows.map((m) => ({
    ...m,
    positions: positions.filter((p) => p.modelId === m.id).map(({ position, partType, count }) => ({ position, partType, count })),
    tolerances: tolerances.filter((t) => t.modelId === m.id).map(({ partType, mismatchLimitDb }) => ({ partType, mismatchLimitDb })),
  }));
}

/** One model row by its id, or null. */
export async function modelById(db: DbOrTx, id: string) {
  const [row] = await db.select().from(models).where(eq(models.id, id)).limit(1);
  return row ?? null;
}

export function listFinishes(db: DbOrTx) {
  return db.select().from(finishes).orderBy(asc(finishes.kind), asc(finishes.name));
}

export function listDealers(db: DbOrTx) {
  return db.select().from(dealers).orderBy(asc(dealers.name));
}
