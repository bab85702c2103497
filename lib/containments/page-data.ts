import "server-only";
import type { DbOrTx } from "@/db";
import { AFFECTED_GROUPS, type AffectedGroup } from "@/lib/vocabulary/containments";
import { affectedSerials, containmentDetail, dealersOf, noticesOf, type AffectedSerial, type ContainmentDetail, type NoticeRow } from "./queries";

/** Rows per group the containment page shows at first: enough to work through, never thousands of tick boxes. */
export const CONTAINMENT_PAGE_ROWS = 200;

export interface ContainmentPageData {
  c: ContainmentDetail;
  groups: Record<AffectedGroup, AffectedSerial[]>;
  notices: NoticeRow[];
  dealers: Awaited<ReturnType<typeof dealersOf>>;
}

/**
 * Everything the containment's page reads, in one place so the benchmark times exactly what the
 * page reads: the containment with its progress, the first `shown[group]` serials of each group,
 * who was told, and the dealers for the exports. Refuses an unknown code (404).
 */
export async function containmentPageData(db: DbOrTx, code: string, shown: Partial<Record<AffectedGroup, number>> = {}): Promise<ContainmentPageData> {
  const c = await containmentDetail(db, code);
  const [lists, notices, dealers] = await Promise.all([
    Promise.all(AFFECTED_GROUPS.map((g) => (c.progress.byGroup[g] ? affectedSerials(db, c.id, { group: g, limit: shown[g] ?? CONTAINMENT_PAGE_ROWS }) : Promise.resolve([])))),
    noticesOf(db, c.id),
    dealersOf(db, c.id),
  ]);
  const groups = Object.fromEntries(AFFECTED_GROUPS.map((g, i) => [g, lists[i]!])) as Record<AffectedGroup, AffectedSerial[]>;
  return { c, groups, notices, dealers };
}
