import type { Metadata } from "next";
import Link from "next/link";
import { ProgressBar } from "@/components/quality/containment-progress";
import { RaiseForm } from "@/components/quality/raise-form";
import { TextWithSerials } from "@/components/register/serial-link";
import { Badge } from "@/components/ui/badge";
import { BackLink } from "@/components/ui/back-link";
import { DataTable } from "@/components/ui/data-table";
import { PageHeader, Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { now } from "@/lib/clock";
import { listContainments } from "@/lib/containments";
import { formatDate, formatWhen, timesNote } from "@/lib/format";
import { paths } from "@/lib/paths";
import { CONTAINMENT_SEVERITIES, SEVERITY_LABEL, SEVERITY_TONE } from "@/lib/vocabulary/containments";
import { ROUTE_STATIONS, STATION_NAME } from "@/lib/vocabulary/stations";
import { workshopDay } from "@/lib/workshop-time";
import { previewContainmentAction, raiseContainmentAction } from "./actions";

export const metadata: Metadata = { title: "Containments" };


/** Every containment, open ones first; quality raises new ones here. Others read the list. */
export default async function ContainmentsPage() {
  const user = await requirePage("register.read");
  const canWork = user.permissions.has("quality.work");
  const at = now();
  const list = await listContainments(getDb(), { limit: 500 });
  return (
    <div className="flex flex-col gap-6" data-testid="containments-page">
      {canWork ? <BackLink href={paths.quality}>Quality</BackLink> : null}
      <PageHeader title="Containments" lead="A suspect lot, batch, flitch, serial or station window, and every serial that holds it: held, quarantined or traced to its dealer and owner until each one is dealt with." />
      <Panel title="All containments">
        <DataTable
          caption="Containments, open ones first"
          testId="containments-table"
          empty="No containment has been raised."
          columns={[
            { key: "code", label: "Code" },
            { key: "target", label: "What is suspect", cellClassName: "min-w-48" },
            { key: "severity", label: "Severity" },
            { key: "raised", label: "Raised" },
            { key: "progress", label: "Progress", numeric: true },
            { key: "closed", label: "Closed" },
          ]}
          rows={list.map((c) => ({
            id: c.code,
            cells: {
              code: { value: c.code, display: <Link className="serial font-bold text-leaf-dark underline" href={paths.containment(c.code)}>{c.code}</Link> },
              target: { value: c.target, display: <TextWithSerials text={c.target} /> },
              severity: { value: CONTAINMENT_SEVERITIES.indexOf(c.severity), display: <Badge tone={SEVERITY_TONE[c.severity]}>{SEVERITY_LABEL[c.severity]}</Badge> },
              raised: { value: c.raisedAt.getTime(), display: `${formatWhen(c.raisedAt, at)} by ${c.raisedBy}` },
              progress: { value: c.affected ? c.dispositioned / c.affected : 0, display: <ProgressBar done={c.dispositioned} total={c.affected} /> },
              closed: { value: c.closedAt?.getTime() ?? 0, display: c.closedAt ? formatDate(c.closedAt, at) : <Badge tone="caution">Open</Badge> },
            },
          }))}
        />
        <p className="mt-2 text-sm text-ink-soft">{timesNote()}</p>
      </Panel>
      {canWork ? (
        <Panel title="Raise a containment">
          <div id="raise">
            <RaiseForm
              preview={previewContainmentAction}
              raise={raiseContainmentAction}
              stations={ROUTE_STATIONS.map((s) => ({ value: s, label: STATION_NAME[s] }))}
              today={workshopDay(at)}
            />
          </div>
        </Panel>
      ) : null}
    </div>
  );
}
