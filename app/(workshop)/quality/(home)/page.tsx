import { paths } from "@/lib/paths";
import type { Metadata } from "next";
import { AreaOverview } from "@/components/shell/area-overview";
import { SerialLink } from "@/components/register/serial-link";
import { DataTable } from "@/components/ui/data-table";
import { Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { Notice } from "@/components/ui/notice";
import { now } from "@/lib/clock";
import { formatWhen, timesNote } from "@/lib/format";
import { dispositionedNonconformances, dispositionSummary, ncsToDisposition } from "@/lib/route/nonconformances";
import { DISPOSITION_WORDS, dispositionPhrase, ncWhere } from "@/lib/route/words";
import { DispositionForm } from "../disposition-form";
import Link from "next/link";
import { ProgressBar } from "@/components/quality/containment-progress";
import { TextWithSerials } from "@/components/register/serial-link";
import { Badge } from "@/components/ui/badge";
import { buttonClasses } from "@/components/ui/button";
import { listContainments } from "@/lib/containments";
import { SEVERITY_LABEL, SEVERITY_TONE } from "@/lib/vocabulary/containments";


export const metadata: Metadata = { title: "Quality" };

export default async function Page({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  await requirePage("quality.work");
  const db = getDb();
  const at = now();
  const [forms, closed, containments] = await Promise.all([ncsToDisposition(db), dispositionedNonconformances(db), listContainments(db, { limit: 50 })]);
  const openContainments = containments.filter((c) => !c.closedAt);
  // What the disposition form just recorded, read back from the register (the code alone comes from the address).
  const { dispositioned } = await searchParams;
  const recorded = typeof dispositioned === "string" ? await dispositionSummary(db, dispositioned) : null;
  return (
    <AreaOverview area={areaByKey("quality")}>
      {recorded ? (
        <Notice tone="leaf" testId="disposition-recorded">
          {recorded}
        </Notice>
      ) : null}
      <Panel
        title="Containments"
        actions={
          <div className="flex flex-wrap gap-3">
            <Link className={buttonClasses("secondary")} href={paths.containments}>
              All containments
            </Link>
            <Link className={buttonClasses("primary")} href={`${paths.containments}#raise`} data-testid="raise-containment-link">
              Raise a containment
            </Link>
          </div>
        }
      >
        {openContainments.length ? (
          <ul className="flex flex-col gap-2" data-testid="open-containments">
            {openContainments.map((c) => (
              <li key={c.code} className="flex flex-wrap items-center gap-x-4 gap-y-1 rounded-lg border border-line px-3 py-2">
                <Link className="serial font-bold text-leaf-dark underline" href={paths.containment(c.code)}>
                  {c.code}
                </Link>
                <Badge tone={SEVERITY_TONE[c.severity]}>{SEVERITY_LABEL[c.severity]}</Badge>
                <span className="min-w-0 flex-1 basis-48">
                  <TextWithSerials text={c.target} />
                </span>
                <ProgressBar done={c.dispositioned} total={c.affected} />
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-ink-soft">No containment is open.</p>
        )}
      </Panel>
      <Panel title="Open nonconformances">
        {forms.length ? (
          <div className="flex flex-col gap-6" data-testid="open-ncs">
            {forms.map(({ nc, pair, steps, sides, entryError }) => (
              <div key={nc.id}>
                <p className="mb-2">
                  <span className="font-bold">{nc.code}</span> on <SerialLink identity={pair} href={paths.cabinetPair(pair)} />, opened {formatWhen(nc.openedAt, at)} {ncWhere(nc.seq, steps.find((s) => s.seq === nc.seq)?.name)}: {nc.finding}
                </p>
                <DispositionForm nc={{ id: nc.id, code: nc.code, seq: nc.seq, entryError }} steps={steps} sides={sides} back={paths.quality} />
              </div>
            ))}
          </div>
        ) : (
          <p className="text-ink-soft">No nonconformance is open.</p>
        )}
      </Panel>
      <Panel title="Dispositioned">
        <DataTable
          caption="Nonconformances dispositioned, newest first"
          testId="closed-ncs"
          empty="None yet."
          initialSort={{ key: "at", dir: "desc" }}
          columns={[
            { key: "code", label: "Code" },
            { key: "finding", label: "Finding" },
            { key: "disposition", label: "Disposition" },
            { key: "reason", label: "Reason" },
            { key: "at", label: "When" },
          ]}
          rows={closed.map((n) => ({
            id: n.id,
            cells: {
              code: { value: n.code },
              finding: { value: n.finding },
              disposition: { value: n.disposition ? DISPOSITION_WORDS[n.disposition] : "", display: n.disposition ? dispositionPhrase({ disposition: n.disposition, seq: n.seq, reworkToSeq: n.reworkToSeq }) : "" },
              reason: { value: n.reason ?? "" },
              at: { value: n.dispositionedAt?.getTime() ?? 0, display: n.dispositionedAt ? formatWhen(n.dispositionedAt, at) : "" },
            },
          }))}
        />
        <p className="mt-2 text-sm text-ink-soft" data-testid="times-note">
          {timesNote()}
        </p>
      </Panel>
    </AreaOverview>
  );
}
