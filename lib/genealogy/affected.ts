import "server-only";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import type { ItemKind } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";

/** The kinds a recall is counted in: what a workshop builds, sells and services. */
export const AFFECTED_KINDS = ["speaker", "pair"] as const satisfies readonly ItemKind[];
export type AffectedKind = (typeof AFFECTED_KINDS)[number];

export interface AffectedItem {
  id: string;
  kind: AffectedKind;
  identity: string;
  state: string;
}

/**
 * Every speaker and pair that holds `targetItemId` today, through any depth of open links (a lot in
 * a crossover in a speaker in a pair; a flitch in a leaf on a cabinet in a pair), and the target
 * itself when it is one. Reads the holdings index (kept with the links by lib/genealogy/graph.ts),
 * so a lot in thousands of serials is one range read. Ordered pairs first, then by identity.
 * Writes nothing; an id the register does not know is refused.
 */
export async function affectedBy(db: DbOrTx, targetItemId: string): Promise<AffectedItem[]> {
  const [target] = await db.all<{ id: string }>(sql`SELECT id FROM items WHERE id = ${targetItemId}`);
  if (!target) throw new AppError(404, "That item is not in the register.");
  const kinds = sql.join(AFFECTED_KINDS.map((k) => sql`${k}`), sql`, `);
  const rows = await db.all<AffectedItem>(sql`
    SELECT i.id, i.kind, i.identity, i.state FROM holdings h JOIN items i ON i.id = h.holder_id
    WHERE h.item_id = ${targetItemId} AND h.holder_kind IN (${kinds})
    UNION
    SELECT id, kind, identity, state FROM items WHERE id = ${targetItemId} AND kind IN (${kinds})`);
  const cmp = (x: string, y: string) => (x < y ? -1 : x > y ? 1 : 0);
  return rows.sort((a, b) => cmp(a.kind === "pair" ? "0" : "1", b.kind === "pair" ? "0" : "1") || cmp(a.identity, b.identity));
}
