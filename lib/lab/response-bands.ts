import "server-only";
import { inArray, sql } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db";
import { responseBands, responses } from "@/db/schema";
import { bandLevels, thirdOctaveBands } from "@/lib/acoustics";
import { isPartType, type PartType } from "@/lib/vocabulary/part-types";

/**
 * The band each part type is matched over: where it plays in a typical two- or three-way design.
 * Common practice (no published source): a tweeter above about 1.6 kHz, a midrange from 200 Hz to
 * 5 kHz, a bass unit from 31.5 Hz to 1 kHz.
 */
export const PASSBANDS: Record<PartType, { minHz: number; maxHz: number }> = {
  tweeter: { minHz: 1600, maxHz: 20000 },
  midrange: { minHz: 200, maxHz: 5000 },
  bass: { minHz: 31.5, maxHz: 1000 },
};

/** The one-third-octave bands over a part type's passband, on which its units are matched. */
export function bandsOf(partType: PartType) {
  const pass = PASSBANDS[partType];
  return thirdOctaveBands(pass.minHz, pass.maxHz);
}

/** A drive unit's levels over its passband, or null where the response does not cover it (matching then says why). */
function levelsOver(points: number[][], partType: PartType): number[] | null {
  try {
    return bandLevels(points.map(([hz, db]) => ({ hz: hz!, db: db! })), bandsOf(partType));
  } catch {
    return null;
  }
}

/**
 * Keeps a drive unit's band levels beside its response, in the transaction that records it. A
 * response that does not cover the passband keeps none: readiness then reads its points, and says
 * why it cannot be matched as it always did.
 */
export async function keepBandLevels(tx: DbOrTx, responseId: number, partType: string | null, points: number[][]): Promise<void> {
  if (!partType || !isPartType(partType)) return;
  const levels = levelsOver(points, partType);
  if (!levels) return;
  const pass = PASSBANDS[partType];
  await tx.insert(responseBands).values({ responseId, minHz: pass.minHz, maxHz: pass.maxHz, levels });
}

/** The points of these responses, by response id: for the few whose levels were not stored. */
export async function pointsOfResponses(db: DbOrTx, responseIds: number[]): Promise<Map<number, number[][]>> {
  if (!responseIds.length) return new Map();
  const rows = await db.select({ id: responses.id, points: responses.points }).from(responses).where(inArray(responses.id, responseIds));
  return new Map(rows.map((r) => [r.id, r.points]));
}

const FILL_PAGE = 500;

/**
 * Works out the band levels of drive units' responses recorded before they were kept: run by
 * `migrateDatabase` after the migrations, a page at a time. Returns how many were filled; nothing
 * to do costs one query. (A response kept over a passband since changed is not filled again: its
 * levels are worked out from its points when read.)
 */
export async function fillBandLevels(db: Db): Promise<number> {
  let filled = 0;
  for (let after = 0; ; ) {
    const page = await db.all<{ id: number; part_type: string; points: string }>(sql`
      SELECT r.id, i.part_type, r.points FROM responses r JOIN items i ON i.id = r.item_id
      WHERE r.id > ${after} AND r.purpose = 'unit' AND i.kind = 'drive_unit' AND i.part_type IS NOT NULL
        AND NOT EXISTS (SELECT 1 FROM response_bands b WHERE b.response_id = r.id)
      ORDER BY r.id LIMIT ${FILL_PAGE}`);
    if (!page.length) return filled;
    after = Number(page.at(-1)!.id);
    const rows = page.flatMap((r) => {
      if (!isPartType(r.part_type)) return [];
      const levels = levelsOver(JSON.parse(r.points) as number[][], r.part_type);
      const pass = PASSBANDS[r.part_type];
      return levels ? [{ responseId: Number(r.id), minHz: pass.minHz, maxHz: pass.maxHz, levels }] : [];
    });
    if (rows.length) await db.insert(responseBands).values(rows).onConflictDoNothing();
    filled += rows.length;
  }
}
