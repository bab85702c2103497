import { getDb } from "@/db";
import { guardedRoute } from "@/lib/auth/guard";
import { affectedSerials, containmentDetail, noticesOf } from "@/lib/containments";

const iso = (d: Date | null) => (d ? d.toISOString() : null);

/** One containment: what it names and why, who raised and closed it, its progress, who was told, and every affected serial. */
export const GET = guardedRoute("register.read", {}, async ({ params }) => {
  const db = getDb();
  const c = await containmentDetail(db, String(params.code ?? ""));
  const [notices, rows] = await Promise.all([noticesOf(db, c.id), affectedSerials(db, c.id)]);
  const { cells: _cells, ...progress } = c.progress;
  return {
    code: c.code,
    target: {
      label: c.targetLabel,
      ...(c.station ? { station: c.station, from: iso(c.windowFrom), to: iso(c.windowTo) } : {}),
    },
    reason: c.reason,
    severity: c.severity,
    raisedAt: iso(c.raisedAt),
    raisedBy: c.raisedByName,
    closedAt: iso(c.closedAt),
    closeReason: c.closeReason,
    approvedBy: c.approvedByName,
    progress,
    notices: notices.map((n) => ({
      to: n.to,
      name: n.name,
      ...(n.dealerCode ? { dealerCode: n.dealerCode } : {}),
      serials: n.serials,
      queuedAt: iso(n.queuedAt),
      by: n.by,
      status: n.status,
      sentAt: iso(n.sentAt),
    })),
    affected: rows.map((r) => ({
      serial: r.serial,
      kind: r.kind,
      pair: r.pair,
      group: r.group,
      // As in the answer to raising one: "state" is the item's own state; "disposition" where
      // the containment has got to with it.
      state: r.itemState,
      disposition: r.state,
      dealer: r.dealer ? { code: r.dealer.code, name: r.dealer.name } : null,
      owner: r.owner,
      caseCode: r.caseCode,
      at: iso(r.at),
      by: r.by,
      note: r.note,
    })),
  };
});
