import "server-only";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import type { Containment } from "@/db/schema";
import { listOutbox, type OutboxStatus } from "@/lib/mail/outbox";
import { AFFECTED_GROUPS, AFFECTED_STATES, isDispositioned, type AffectedGroup, type AffectedState } from "@/lib/vocabulary/containments";
import { containmentOrRefuse } from "./work";

export interface ContainmentSummary {
  code: string;
  target: string;
  severity: Containment["severity"];
  reason: string;
  raisedAt: Date;
  raisedBy: string;
  closedAt: Date | null;
  affected: number;
  dispositioned: number;
}

/** Every containment, open ones first, newest first, with its progress. */
export async function listContainments(db: DbOrTx, opts: { limit?: number } = {}): Promise<ContainmentSummary[]> {
  const rows = await db.all<{ code: string; target_label: string; severity: Containment["severity"]; reason: string; raised_at: number; raised_by: string; closed_at: number | null; affected: number; done: number }>(sql`
    SELECT c.code, c.target_label, c.severity, c.reason, c.raised_at, u.name AS raised_by, c.closed_at,
           (SELECT count(*) FROM containment_items ci WHERE ci.containment_id = c.id) AS affected,
           (SELECT count(*) FROM containment_items ci WHERE ci.containment_id = c.id
              AND (ci.state IN ('cleared', 'replaced') OR (ci.state = 'failed' AND ci.case_id IS NOT NULL))) AS done
    FROM containments c JOIN users u ON u.id = c.raised_by
    ORDER BY c.closed_at IS NOT NULL, c.raised_at DESC
    LIMIT ${opts.limit ?? 200}`);
  return rows.map((r) => ({
    code: r.code,
    target: r.target_label,
    severity: r.severity,
    reason: r.reason,
    raisedAt: new Date(Number(r.raised_at)),
    raisedBy: r.raised_by,
    closedAt: r.closed_at === null ? null : new Date(Number(r.closed_at)),
    affected: Number(r.affected),
    dispositioned: Number(r.done),
  }));
}

export interface AffectedSerial {
  serial: string;
  kind: string;
  /** The item's state now. */
  itemState: string;
  pair: string | null;
  group: AffectedGroup;
  state: AffectedState;
  dealer: { code: string; name: string; city: string } | null;
  /** The newest registered owner of its pair, when there is one. */
  owner: string | null;
  caseCode: string | null;
  /** When it last moved (the raise, until its first move). */
  at: Date;
  by: string | null;
  note: string | null;
}

/**
 * A containment's affected serials, ordered by group, then pairs before their speakers, then
 * identity; optionally one group, one state or one dealer's (by code). One read.
 */
export async function affectedSerials(
  db: DbOrTx,
  containmentId: string,
  opts: { group?: AffectedGroup; state?: AffectedState; dealerCode?: string; limit?: number; offset?: number } = {},
): Promise<AffectedSerial[]> {
  const rows = await db.all<{
    identity: string; kind: string; item_state: string; pair: string | null; grp: AffectedGroup; state: AffectedState;
    d_code: string | null; d_name: string | null; d_city: string | null; owner: string | null; case_code: string | null; at: number; by: string | null; note: string | null;
  }>(sql`
    WITH page AS (
      SELECT ci.id,
             CASE ci."group" WHEN 'in_build' THEN 0 WHEN 'in_stock' THEN 1 WHEN 'packed' THEN 2 ELSE 3 END AS g,
             coalesce(p.identity, ci.identity) AS k1, ci.kind <> 'pair' AS k2, ci.identity AS k3
      FROM containment_items ci
      LEFT JOIN items p ON p.id = ci.pair_id
      ${opts.dealerCode ? sql`LEFT JOIN dealers d ON d.id = ci.dealer_id` : sql``}
      WHERE ci.containment_id = ${containmentId}
        ${opts.group ? sql`AND ci."group" = ${opts.group}` : sql``}
        ${opts.state ? sql`AND ci.state = ${opts.state}` : sql``}
        ${opts.dealerCode ? sql`AND d.code = ${opts.dealerCode}` : sql``}
      ORDER BY g, k1, k2, k3
      LIMIT ${opts.limit ?? -1} OFFSET ${opts.offset ?? 0}
    )
    -- The page is chosen on the sort keys alone; only its rows are joined to the rest (SQLite
    -- computes every output column before it sorts, and an owner look-up per row of thousands is slow).
    SELECT ci.identity, ci.kind, i.state AS item_state, p.identity AS pair, ci."group" AS grp, ci.state,
           d.code AS d_code, d.name AS d_name, d.city AS d_city,
           (SELECT o.name FROM ownerships os JOIN owners o ON o.id = os.owner_id WHERE os.item_id = ci.pair_id ORDER BY os.since DESC, os.id DESC LIMIT 1) AS owner,
           sc.code AS case_code, e.at, u.name AS by, e.reason AS note
    FROM page
    JOIN containment_items ci ON ci.id = page.id
    JOIN items i ON i.id = ci.item_id
    LEFT JOIN items p ON p.id = ci.pair_id
    LEFT JOIN dealers d ON d.id = ci.dealer_id
    LEFT JOIN service_cases sc ON sc.id = ci.case_id
    JOIN events e ON e.id = ci.event_id
    LEFT JOIN users u ON u.id = e.actor_id
    ORDER BY page.g, page.k1, page.k2, page.k3`);
  return rows.map((r) => ({
    serial: r.identity,
    kind: r.kind,
    itemState: r.item_state,
    pair: r.pair,
    group: r.grp,
    state: r.state,
    dealer: r.d_code && r.d_name ? { code: r.d_code, name: r.d_name, city: r.d_city ?? "" } : null,
    owner: r.owner,
    caseCode: r.case_code,
    at: new Date(Number(r.at)),
    by: r.by,
    note: r.note,
  }));
}

export interface ContainmentProgress {
  total: number;
  dispositioned: number;
  byGroup: Record<AffectedGroup, number>;
  byState: Record<AffectedState, number>;
  /** Dispositioned serials per group. */
  dispositionedByGroup: Record<AffectedGroup, number>;
  /** Per group and state, for the progress chart. */
  cells: { group: AffectedGroup; state: AffectedState; n: number }[];
}

export async function progressOf(db: DbOrTx, containmentId: string): Promise<ContainmentProgress> {
  const rows = await db.all<{ grp: AffectedGroup; state: AffectedState; with_case: number; n: number }>(sql`
    SELECT "group" AS grp, state, case_id IS NOT NULL AS with_case, count(*) AS n FROM containment_items
    WHERE containment_id = ${containmentId} GROUP BY "group", state, case_id IS NOT NULL`);
  const byGroup = Object.fromEntries(AFFECTED_GROUPS.map((g) => [g, 0])) as Record<AffectedGroup, number>;
  const byState = Object.fromEntries(AFFECTED_STATES.map((s) => [s, 0])) as Record<AffectedState, number>;
  const dispositionedByGroup = Object.fromEntries(AFFECTED_GROUPS.map((g) => [g, 0])) as Record<AffectedGroup, number>;
  const cells = new Map<string, { group: AffectedGroup; state: AffectedState; n: number }>();
  let total = 0;
  let dispositioned = 0;
  for (const r of rows) {
    const n = Number(r.n);
    total += n;
    byGroup[r.grp] += n;
    byState[r.state] += n;
    if (isDispositioned({ state: r.state, caseId: r.with_case ? "case" : null })) {
      dispositioned += n;
      dispositionedByGroup[r.grp] += n;
    }
    const key = `${r.grp}/${r.state}`;
    const cell = cells.get(key) ?? { group: r.grp, state: r.state, n: 0 };
    cell.n += n;
    cells.set(key, cell);
  }
  return { total, dispositioned, byGroup, byState, dispositionedByGroup, cells: [...cells.values()] };
}

export interface NoticeRow {
  to: "dealer" | "owner";
  /** The dealer's name, or the owner's. */
  name: string;
  dealerCode: string | null;
  email: string;
  serials: number;
  queuedAt: Date;
  by: string | null;
  status: OutboxStatus;
  sentAt: Date | null;
}

/** Who was told, when it was queued, and whether the outbox has delivered it. */
export async function noticesOf(db: DbOrTx, containmentId: string): Promise<NoticeRow[]> {
  const rows = await db.all<{ dealer: string | null; dealer_code: string | null; owner: string | null; serials: number; created_at: number; by: string | null; event_id: number; outbox_id: number }>(sql`
    SELECT d.name AS dealer, d.code AS dealer_code, o.name AS owner, n.serials, n.created_at, u.name AS by, n.event_id, n.outbox_id
    FROM containment_notices n
    LEFT JOIN dealers d ON d.id = n.dealer_id
    LEFT JOIN owners o ON o.id = n.owner_id
    JOIN events e ON e.id = n.event_id
    LEFT JOIN users u ON u.id = e.actor_id
    WHERE n.containment_id = ${containmentId}
    ORDER BY n.id`);
  const mail = new Map((await listOutbox(db, { eventIds: rows.map((r) => Number(r.event_id)) })).map((m) => [m.id, m]));
  return rows.map((r) => {
    const m = mail.get(Number(r.outbox_id));
    return {
      to: r.dealer ? "dealer" : "owner",
      name: r.dealer ?? r.owner ?? "",
      dealerCode: r.dealer_code,
      email: m?.to ?? "",
      serials: Number(r.serials),
      queuedAt: new Date(Number(r.created_at)),
      by: r.by,
      status: m?.status ?? "pending",
      sentAt: m?.sentAt ?? null,
    };
  });
}

export interface ContainmentDetail extends Containment {
  raisedByName: string;
  approvedByName: string | null;
  progress: ContainmentProgress;
}

/** One containment with its people and progress; refuses an unknown code with a 404 in words. */
export async function containmentDetail(db: DbOrTx, code: string): Promise<ContainmentDetail> {
  const c = await containmentOrRefuse(db, code);
  const [names] = await db.all<{ raised: string; approved: string | null }>(sql`
    SELECT (SELECT name FROM users WHERE id = ${c.raisedBy}) AS raised, (SELECT name FROM users WHERE id = ${c.approvedBy}) AS approved`);
  return { ...c, raisedByName: names?.raised ?? "", approvedByName: names?.approved ?? null, progress: await progressOf(db, c.id) };
}

export interface ContainmentTouch {
  code: string;
  closed: boolean;
  serial: string;
  state: AffectedState;
  group: AffectedGroup;
}

/** The containments that listed this item or a serial of its pair, newest first: for its register page. */
export async function containmentsTouching(db: DbOrTx, itemId: string): Promise<ContainmentTouch[]> {
  const rows = await db.all<{ code: string; closed_at: number | null; identity: string; state: AffectedState; grp: AffectedGroup }>(sql`
    SELECT c.code, c.closed_at, ci.identity, ci.state, ci."group" AS grp
    FROM containment_items ci JOIN containments c ON c.id = ci.containment_id
    WHERE ci.item_id = ${itemId} OR ci.pair_id = ${itemId}
    ORDER BY c.raised_at DESC, ci.kind <> 'pair', ci.identity
    LIMIT 20`);
  return rows.map((r) => ({ code: r.code, closed: r.closed_at !== null, serial: r.identity, state: r.state, group: r.grp }));
}

/** The dealers a containment's shipped serials went to, with how many each, for the per-dealer exports. */
export async function dealersOf(db: DbOrTx, containmentId: string): Promise<{ code: string; name: string; city: string; serials: number }[]> {
  const rows = await db.all<{ code: string; name: string; city: string | null; n: number }>(sql`
    SELECT d.code, d.name, d.city, count(*) AS n FROM containment_items ci JOIN dealers d ON d.id = ci.dealer_id
    WHERE ci.containment_id = ${containmentId} GROUP BY d.id ORDER BY d.name`);
  return rows.map((r) => ({ code: r.code, name: r.name, city: r.city ?? "", serials: Number(r.n) }));
}
