import "server-only";
import { asc, eq, inArray, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { dealers, finishes, modelPositions, models, modelTolerances, type Dealer } from "@/db/schema";

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

/** How many shipments back `recentDealers` looks: a few weeks of a busy shop's dispatch. */
const RECENT_SHIPMENTS = 500;

/**
 * The dealers the newest shipments went to, the most recent first (at most `limit`), and how many
 * dealers there are in all. Reads the newest shipments through the kind index, not every dealer's
 * history, so it costs the same after ten years.
 */
export async function recentDealers(db: DbOrTx, limit = 20): Promise<{ dealers: (Dealer & { lastShipped: Date })[]; total: number }> {
  const [row] = await db.all<{ j: string | null; total: number }>(sql`
    SELECT (SELECT count(*) FROM dealers) AS total,
           (SELECT json_group_array(json_array(dealer_id, last)) FROM (
              SELECT dealer_id, max(created_at) AS last FROM (
                SELECT dealer_id, created_at FROM items WHERE kind = 'shipment' ORDER BY created_at DESC LIMIT ${RECENT_SHIPMENTS})
              WHERE dealer_id IS NOT NULL GROUP BY dealer_id ORDER BY last DESC LIMIT ${limit})) AS j`);
  const last = new Map((JSON.parse(row?.j ?? "[]") as [string, number][]).map(([id, at]) => [id, at]));
  const rows = last.size ? await db.select().from(dealers).where(inArray(dealers.id, [...last.keys()])) : [];
  return {
    dealers: rows.map((d) => ({ ...d, lastShipped: new Date(last.get(d.id)!) })).sort((a, b) => b.lastShipped.getTime() - a.lastShipped.getTime()),
    total: Number(row?.total ?? 0),
  };
}
