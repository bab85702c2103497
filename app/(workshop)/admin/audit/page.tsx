import type { Metadata } from "next";
import { Badge } from "@/components/ui/badge";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { summarizeAudit } from "@/lib/audit/summary";
import { verifyAuditTrail } from "@/lib/audit/verify";
import { requirePage } from "@/lib/auth/guard";
import { formatWhenExact } from "@/lib/format";

export const metadata: Metadata = { title: "Audit trail" };
// Checked afresh on every visit: a cached answer could hide a change made since.
export const dynamic = "force-dynamic";

export default async function AuditPage() {
  await requirePage("admin.users");
  const report = await verifyAuditTrail(getDb());
  const { headline, problems } = summarizeAudit(report);
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title="Audit trail"
        lead="Every event the register records is sealed with a fingerprint of its content and of the event before it, so an event changed, removed, added or moved outside Twinleaf shows here. The database's own rules that refuse such changes are checked too."
      />
      <Panel title="Check" actions={<Badge tone={report.intact ? "leaf" : "danger"}>{report.intact ? "Intact" : "Not intact"}</Badge>}>
        <Notice tone={report.intact ? "leaf" : "danger"} testId="audit-result" title={headline}>
          {problems.length > 1 ? (
            <ul className="mt-2 list-disc pl-5">
              {problems.map((p, i) => (
                <li key={i}>{p}</li>
              ))}
            </ul>
          ) : null}
        </Notice>
        <dl className="mt-4 grid grid-cols-[auto_1fr] gap-x-6 gap-y-1">
          <dt className="text-ink-soft">Events checked</dt>
          <dd>{report.events}</dd>
          <dt className="text-ink-soft">Newest event</dt>
          <dd>{report.head?.at ? `number ${report.head.id}, recorded ${formatWhenExact(report.head.at)}` : "none yet"}</dd>
        </dl>
      </Panel>
      <Panel title="If the check fails">
        <p className="text-ink-soft">
          Stop recording, keep the database file as it is, and restore the newest backup that checks intact (README, “Backups”) into a copy to compare. The check itself
          changes nothing. The same check runs from the command line with <code className="font-mono">npm run audit:verify</code>.
        </p>
      </Panel>
    </div>
  );
}
