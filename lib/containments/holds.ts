import "server-only";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { AppError } from "@/lib/auth/errors";
import type { AffectedGroup } from "@/lib/vocabulary/containments";

export interface Hold {
  /** The item asked about. */
  itemId: string;
  /** The affected serial that carries the hold: the item itself, a holder of it, or a part in it. */
  heldIdentity: string;
  group: AffectedGroup;
  code: string;
  reason: string;
}

/**
 * The open containments holding any of `itemIds`: an affected serial not yet cleared or replaced,
 * in an open containment, that is the item itself, holds it (its pair, its speaker) or is held by
 * it (a quarantined unit in a speaker being built, a held pair in a carton). Shipped serials are
 * out of the workshop and hold nothing here. One read through the holdings index.
 */
export async function holdsOn(db: DbOrTx, itemIds: readonly string[]): Promise<Hold[]> {
  const ids = [...new Set(itemIds.filter(Boolean))];
  if (ids.length === 0) return [];
  const json = JSON.stringify(ids);
  const rows = await db.all<{ asked: string; identity: string; grp: AffectedGroup; code: string; reason: string }>(sql`
    WITH asked(id) AS (SELECT value FROM json_each(${json})),
    near(asked, id) AS (
      SELECT id, id FROM asked
      UNION SELECT a.id, h.holder_id FROM asked a JOIN holdings h ON h.item_id = a.id
      UNION SELECT a.id, h.item_id FROM asked a JOIN holdings h ON h.holder_id = a.id
    )
    SELECT n.asked, ci.identity, ci."group" AS grp, c.code, c.reason
    FROM near n
    JOIN containment_items ci ON ci.item_id = n.id AND ci.state NOT IN ('cleared', 'replaced') AND ci."group" <> 'shipped'
    JOIN containments c ON c.id = ci.containment_id AND c.closed_at IS NULL
    ORDER BY c.raised_at, ci.identity`);
  return rows.map((r) => ({ itemId: r.asked, heldIdentity: r.identity, group: r.grp, code: r.code, reason: r.reason }));
}

/** The first open containment holding each of `itemIds`, by item id: lists mark or skip these. */
export async function firstHolds(db: DbOrTx, itemIds: readonly string[]): Promise<Map<string, Hold>> {
  const out = new Map<string, Hold>();
  for (const h of await holdsOn(db, itemIds)) if (!out.has(h.itemId)) out.set(h.itemId, h);
  return out;
}

/** The words of a refusal: "LS1-… is held by containment CN2612-0001 (reason): …". */
export function holdMessage(hold: Hold, identity: string, what: string): string {
  const through = hold.heldIdentity === identity ? "" : ` (through ${hold.heldIdentity})`;
  return `${identity} is held by containment ${hold.code}${through}: ${hold.reason} It cannot ${what} until quality clears it or closes the containment.`;
}

/** The words refusing `what` for an item an open containment holds, or null when none holds it. */
export async function holdRefusal(db: DbOrTx, item: { id: string; identity: string }, what: string): Promise<string | null> {
  const [hold] = await holdsOn(db, [item.id]);
  return hold ? holdMessage(hold, item.identity, what) : null;
}

/**
 * Refuses (409, naming the containment) when an open containment holds any of the items. `items`
 * carry their identity for the message; `what` completes "It cannot …" ("be recorded at a station").
 */
export async function refuseIfHeld(db: DbOrTx, items: readonly { id: string; identity: string }[], what: string, field?: string): Promise<void> {
  const holds = await holdsOn(db, items.map((i) => i.id));
  const first = holds[0];
  if (!first) return;
  const item = items.find((i) => i.id === first.itemId)!;
  const message = holdMessage(first, item.identity, what);
  throw new AppError(409, message, field ? { [field]: [message] } : undefined);
}
