/** The route records as the route reads them: each with its newest correction (lib/route/corrections.ts) applied. */
import "server-only";
import { asc, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { routeCorrections, type RouteRecord } from "@/db/schema";
import type { ReadingValue } from "./types";

/** A record as the route reads it: the newest correction's readings and start, where there is one. */
export function withCorrections(records: RouteRecord[], corrections: { recordId: number; readings: Record<string, ReadingValue>; startedAt: Date; outOfWindow: boolean }[]): RouteRecord[] {
  const newest = new Map<number, (typeof corrections)[number]>();
  // Corrections arrive oldest first, so the last one seen for a record is its newest.
  for (const c of corrections) newest.set(c.recordId, c);
  return records.map((r) => {
    const c = newest.get(r.id);
    return c ? { ...r, readings: c.readings, startedAt: c.startedAt, outOfWindow: c.outOfWindow } : r;
  });
}

/** The records of a pair (or lone cabinet) with their newest corrections applied, oldest first. */
export async function correctedRecords(db: DbOrTx, pairId: string, records: RouteRecord[]): Promise<RouteRecord[]> {
  if (!records.length) return records;
  const corrections = await db
    .select({ recordId: routeCorrections.recordId, readings: routeCorrections.readings, startedAt: routeCorrections.startedAt, outOfWindow: routeCorrections.outOfWindow })
    .from(routeCorrections)
    .where(eq(routeCorrections.pairId, pairId))
    .orderBy(asc(routeCorrections.id));
  return corrections.length ? withCorrections(records, corrections) : records;
}

