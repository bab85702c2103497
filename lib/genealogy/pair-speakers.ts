/** A pair and its two speakers, read from the links: which speaker sits at L and R, and whose pair a speaker is. */
import "server-only";
import { and, desc, eq, inArray, isNull } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { items, links, type Item } from "@/db/schema";
import type { Side } from "@/lib/vocabulary/sides";

/** The speakers a pair holds now, by side. */
export async function speakersOf(db: DbOrTx, pairId: string): Promise<Record<Side, Item | null>> {
  const rows = await db
    .select({ item: items, position: links.position })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(eq(links.parentId, pairId), isNull(links.endedAt), inArray(links.position, ["L", "R"]), eq(items.kind, "speaker")));
  return { L: rows.find((r) => r.position === "L")?.item ?? null, R: rows.find((r) => r.position === "R")?.item ?? null };
}

/** The pair a speaker sits in now (or sat in last), and its side there; null before it was built into one. */
export async function pairOfSpeaker(db: DbOrTx, speakerId: string): Promise<{ pair: Item; side: Side } | null> {
  const [row] = await db
    .select({ pair: items, side: links.position })
    .from(links)
    .innerJoin(items, eq(items.id, links.parentId))
    .where(and(eq(links.childId, speakerId), eq(items.kind, "pair")))
    .orderBy(desc(isNull(links.endedAt)), desc(links.startedAt))
    .limit(1);
  return row && (row.side === "L" || row.side === "R") ? { pair: row.pair, side: row.side } : null;
}
