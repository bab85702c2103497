import "server-only";
import { and, desc, eq, inArray, ne, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/sqlite-core";
import type { DbOrTx } from "@/db";
import { batchUnits, events, items, matchedSets, models, modelTolerances, setMembers, unitBatches } from "@/db/schema";
import type { PartType } from "@/lib/vocabulary/part-types";
import type { Side } from "@/lib/vocabulary/sides";

export interface FailedPart {
  id: string;
  identity: string;
  kind: string;
  partType: string | null;
  /** The reason given when it was set aside, and when. */
  reason: string | null;
  at: Date | null;
}

/**
 * Drive units and crossover boards set aside as failed: the `limit` newest units, each with the
 * reason and time of its newest state change (latest failure first), and how many there are in all.
 */
export async function failedParts(db: DbOrTx, limit = 100): Promise<{ parts: FailedPart[]; total: number }> {
  const failedWhere = and(inArray(items.kind, ["drive_unit", "crossover"]), eq(items.state, "failed"));
  const [count] = await db.select({ n: sql<number>`count(*)` }).from(items).where(failedWhere);
  const total = Number(count?.n ?? 0);
  const failed = await db
    .select({ id: items.id, identity: items.identity, partType: items.partType, kind: items.kind })
    .from(items)
    .where(failedWhere)
    .orderBy(desc(items.createdAt))
    .limit(limit);
  if (!failed.length) return { parts: [], total };
  const reasons = await db
    .select({ subjectId: events.subjectId, reason: events.reason, at: events.at })
    .from(events)
    // By subject kind and id, so the events index answers it instead of a scan of the whole log.
    .where(and(eq(events.subjectKind, "item"), inArray(events.subjectId, failed.map((f) => f.id)), eq(events.type, "item.state_changed")))
    .orderBy(desc(events.id));
  const newest = new Map<string, (typeof reasons)[number]>();
  for (const r of reasons) if (!newest.has(r.subjectId)) newest.set(r.subjectId, r);
  // Chosen as the newest units (a unit or board fails on the bench soon after it is made), shown by when they failed.
  const parts = failed
    .map((f) => {
      const r = newest.get(f.id);
      return { ...f, reason: r?.reason ?? null, at: r?.at ?? null };
    })
    .sort((a, b) => (b.at?.getTime() ?? 0) - (a.at?.getTime() ?? 0));
  return { parts, total };
}

/** Active models that take units of this part type, with their mismatch limit for it. */
export function modelsTakingPartType(db: DbOrTx, partType: PartType) {
  return db
    .select({ id: models.id, code: models.code, name: models.name, limit: modelTolerances.mismatchLimitDb })
    .from(modelTolerances)
    .innerJoin(models, eq(models.id, modelTolerances.modelId))
    .where(and(eq(modelTolerances.partType, partType), eq(models.active, true)));
}

export interface LabOrigin {
  batch: { code: string; lot: string; maker: string; makerSerial: string | null } | null;
  sets: { id: string; code: string; side: Side; endedAt: Date | null; endReason: string | null; maxDiffDb: number; limitDb: number; createdAt: Date; partner: string | null }[];
}

/** A drive unit's batch and the matched sets it is or was reserved in, each with its partner (two queries). */
export async function labOrigin(db: DbOrTx, itemId: string): Promise<LabOrigin> {
  const [batch] = await db
    .select({ code: unitBatches.code, lot: unitBatches.lot, maker: unitBatches.maker, makerSerial: batchUnits.makerSerial })
    .from(batchUnits)
    .innerJoin(unitBatches, eq(unitBatches.id, batchUnits.batchId))
    .where(eq(batchUnits.itemId, itemId))
    .limit(1);
  const mine = alias(setMembers, "mine");
  const rows = await db
    .select({ set: matchedSets, side: mine.side, endedAt: mine.endedAt, endReason: mine.endReason, partner: items.identity })
    .from(mine)
    .innerJoin(matchedSets, eq(matchedSets.id, mine.setId))
    .leftJoin(setMembers, and(eq(setMembers.setId, mine.setId), ne(setMembers.itemId, itemId)))
    .leftJoin(items, eq(items.id, setMembers.itemId))
    .where(eq(mine.itemId, itemId));
  return {
    batch: batch ?? null,
    sets: rows.map((r) => ({
      id: r.set.id,
      code: r.set.code,
      side: r.side,
      endedAt: r.endedAt,
      endReason: r.endReason,
      maxDiffDb: r.set.maxDiffDb,
      limitDb: r.set.limitDb,
      createdAt: r.set.createdAt,
      partner: r.partner,
    })),
  };
}
