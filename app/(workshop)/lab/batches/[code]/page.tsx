import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { PrintLabels } from "@/components/register/print-labels";
import { SerialLink } from "@/components/register/serial-link";
import { BackLink } from "@/components/ui/back-link";
import { Badge } from "@/components/ui/badge";
import { buttonClasses } from "@/components/ui/button";
import { DataTable } from "@/components/ui/data-table";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { formatCalendarDay, formatWhen } from "@/lib/format";
import { stateLabel } from "@/lib/vocabulary/item-kinds";
import { formatTs } from "@/lib/acoustics";
import { countUnits, UNIT_CLASS_WORDS, UNIT_CLASSES } from "@/lib/lab/unit-counts";
import { batchByCode, batchUnitsView, matchReadiness } from "@/lib/lab/units";
import { partWord } from "@/lib/vocabulary/part-types";
import { BulkTabs } from "./bulk-tabs";
import { MeasureDialog } from "./measure-dialog";

export async function generateMetadata({ params }: { params: Promise<{ code: string }> }): Promise<Metadata> {
  return { title: `Batch ${pageParam((await params).code)}` };
}

const ts = (field: Parameters<typeof formatTs>[0], n: number | null) => (n === null ? "" : formatTs(field, n));
const TONE: Record<string, "info" | "leaf" | "walnut" | "danger" | "neutral"> = { awaiting_measurement: "neutral", measured: "info", reserved: "leaf", failed: "danger", fitted: "walnut" };

export default async function BatchPage({ params, searchParams }: { params: Promise<{ code: string }>; searchParams: Promise<{ registered?: string }> }) {
  await requirePage("lab.work");
  const db = getDb();
  const code = pageParam((await params).code);
  const batch = await batchByCode(db, code);
  if (!batch) notFound();
  const units = await batchUnitsView(db, batch.id);
  const registered = (await searchParams).registered;
  const counts = countUnits(units.map((u) => ({ state: u.state, inOpenSet: u.setCode !== null, n: 1 })));
  // Matching is offered only when it can pair something; otherwise the page says why.
  const readiness = counts.free >= 2 ? await matchReadiness(db, batch) : null;
  return (
    <div className="flex flex-col gap-6" data-testid="batch-page">
      <BackLink href="/lab">Lab</BackLink>
      <PageHeader
        title={<span className="serial" data-testid="batch-code">{batch.code}</span>}
        lead={`${units.length} ${partWord(batch.partType)}s · ${batch.maker} ${batch.partNumber} · lot ${batch.lot} · received ${formatCalendarDay(batch.receivedOn)}`}
        actions={
          readiness?.canMatch ? (
            <Link className={buttonClasses("primary")} href={`/lab/match?batch=${encodeURIComponent(batch.code)}`} data-testid="match-batch">
              Match {readiness.free} measured units
            </Link>
          ) : null
        }
      />
      {registered ? <Notice tone="leaf">Batch registered with {units.length} units. Print their labels, then bring in the measurements.</Notice> : null}
      <p className="text-ink-soft" data-testid="batch-counts">
        {UNIT_CLASSES.filter((c) => c !== "other" || counts.other > 0)
          .map((c) => `${counts[c]} ${UNIT_CLASS_WORDS[c].sentence}`)
          .join(" · ")}
      </p>
      {readiness?.quarantined ? (
        <Notice tone="caution" testId="left-out-held">
          {readiness.quarantined} measured {readiness.quarantined === 1 ? "unit is" : "units are"} held by an open containment and left out of matching until quality releases {readiness.quarantined === 1 ? "it" : "them"}.
        </Notice>
      ) : null}
      {readiness && !readiness.canMatch && readiness.why ? (
        <Notice tone="caution" testId="match-not-offered">
          {readiness.why} Matching is offered once two units can pair.
        </Notice>
      ) : null}
      <Panel title="Units">
        <DataTable
          caption={`Units of batch ${batch.code}`}
          testId="units-table"
          columns={[
            { key: "identity", label: "Serial, maker's serial" },
            { key: "state", label: "State, response" },
            { key: "fs", label: "Fs, Hz", numeric: true },
            { key: "qts", label: "Qts", numeric: true },
            { key: "re", label: "Re, Ω", numeric: true },
            // Columns nobody has filled yet are left out, so the ones that matter fit the page.
            ...(units.some((u) => u.sensitivityDb !== null) ? [{ key: "spl", label: "SPL, dB", numeric: true }] : []),
            ...(units.some((u) => u.setCode) ? [{ key: "set", label: "Set" }] : []),
            { key: "act", label: "", sortable: false },
          ]}
          rows={units.map((u) => ({
            id: u.id,
            cells: {
              identity: {
                value: u.identity,
                display: (
                  <span>
                    <SerialLink identity={u.identity} />
                    {u.makerSerial ? <span className="block text-sm text-ink-soft">maker&apos;s {u.makerSerial}</span> : null}
                  </span>
                ),
              },
              state: {
                value: u.state,
                display: (
                  <span>
                    <Badge tone={TONE[u.state] ?? "neutral"}>{stateLabel(u.state)}</Badge>
                    <span className="block text-sm whitespace-nowrap text-ink-soft">{u.responseAt ? `response ${formatWhen(u.responseAt)}` : "no response yet"}</span>
                  </span>
                ),
              },
              fs: { value: u.fsHz, display: ts("fs", u.fsHz) },
              qts: { value: u.qts, display: ts("qts", u.qts) },
              re: { value: u.reOhm, display: ts("re", u.reOhm) },
              spl: { value: u.sensitivityDb, display: ts("sensitivity", u.sensitivityDb) },
              set: { value: u.setCode ?? "" },
              act: { value: null, display: u.state === "awaiting_measurement" || u.state === "measured" ? <MeasureDialog batch={batch.code} unit={{ id: u.id, identity: u.identity }} /> : null },
            },
          }))}
        />
      </Panel>
      <Panel title="Bring in a whole batch">
        <BulkTabs batch={batch.code} />
      </Panel>
      <Panel title="Labels">
        <PrintLabels identities={units.map((u) => u.identity)} />
      </Panel>
    </div>
  );
}
