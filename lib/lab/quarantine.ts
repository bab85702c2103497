/** Stock an open containment quarantines: matching and the service desk's replacements leave it out. */
import "server-only";
import type { DbOrTx } from "@/db";
import { firstHolds, refuseIfHeld } from "@/lib/containments/holds";

export interface Quarantined {
  itemId: string;
  identity: string;
  /** The containment that holds it. */
  code: string;
}

/** Splits parts into those free to offer and those an open containment holds, in one read. */
export async function withoutQuarantined<T extends { id: string; identity: string }>(db: DbOrTx, rows: readonly T[]): Promise<{ free: T[]; quarantined: Quarantined[] }> {
  const holds = await firstHolds(db, rows.map((r) => r.id));
  const free: T[] = [];
  const quarantined: Quarantined[] = [];
  for (const r of rows) {
    const hold = holds.get(r.id);
    if (hold) quarantined.push({ itemId: r.id, identity: r.identity, code: hold.code });
    else free.push(r);
  }
  return { free, quarantined };
}

/** Refuses (409, naming the containment) a plan that names a quarantined part: the page showed it before the hold. */
export async function refuseQuarantinedIn(db: DbOrTx, quarantined: readonly Quarantined[], asked: readonly string[]): Promise<void> {
  const named = quarantined.filter((q) => asked.includes(q.identity));
  if (named.length) await refuseIfHeld(db, named.map((q) => ({ id: q.itemId, identity: q.identity })), "be matched");
}
