import type { Metadata } from "next";
import Link from "next/link";
import { PairChart } from "@/components/lab/pair-chart-lazy";
import { BackLink } from "@/components/ui/back-link";
import { DataTable } from "@/components/ui/data-table";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { bandLabel, compareResponses, formatDb, formatHzRange, formatLimitDb } from "@/lib/acoustics";
import { requirePage } from "@/lib/auth/guard";
import { formatDay } from "@/lib/format";
import { itemByIdentity } from "@/lib/genealogy/graph";
import { modelById } from "@/lib/workshop/queries";
import { latestFinalTest, pairsAwaitingTest } from "@/lib/lab/final-test";
import { FinalTestForm } from "./test-form";

export const metadata: Metadata = { title: "Final pair test" };

export default async function Page({ searchParams }: { searchParams: Promise<{ pair?: string; result?: string }> }) {
  await requirePage("lab.work");
  const db = getDb();
  const sp = await searchParams;
  const waiting = await pairsAwaitingTest(db);
  const pair = sp.pair ? await itemByIdentity(db, sp.pair) : null;
  const last = pair ? await latestFinalTest(db, pair.id) : null;
  const model = pair?.modelId ? await modelById(db, pair.modelId) : null;
  const pts = (r: { points: number[][] }) => r.points.map((p) => ({ hz: p[0]!, db: p[1]! }));
  const comparison = last && model ? compareResponses(pts(last.left), pts(last.right), { minHz: model.responseMinHz, maxHz: model.responseMaxHz, limitDb: last.test.limitDb }) : null;
  return (
    <div className="flex flex-col gap-6" data-testid="final-test-page">
      <BackLink href="/lab">Lab</BackLink>
      <PageHeader title="Final pair test" lead="The finished left and right speakers, compared in one-third-octave bands over the model's range. A band exactly at the limit passes." />
      {last && pair && model && comparison ? (
        <Panel title={`${pair.identity}: ${last.test.pass ? "passed" : "failed"}`}>
          <Notice tone={last.test.pass ? "leaf" : "danger"} testId="final-test-result" className="mb-4">
            {last.test.pass
              ? `Passed: the largest difference is ${formatDb(last.test.maxDiffDb)} at ${bandLabel(last.test.worstBand)}, within the ${formatLimitDb(last.test.limitDb)} limit. The pair is ready to pack.`
              : `Failed: ${formatDb(last.test.maxDiffDb)} at ${bandLabel(last.test.worstBand)}, over the ${formatLimitDb(last.test.limitDb)} limit. A nonconformance is open for quality.`}
          </Notice>
          <PairChart
            title={`${model.code} ${model.name}: left and right, ${formatHzRange(model.responseMinHz, model.responseMaxHz)}`}
            a={{ label: "Left", points: last.left.points.map((p) => [p[0]!, p[1]!] as [number, number]) }}
            b={{ label: "Right", points: last.right.points.map((p) => [p[0]!, p[1]!] as [number, number]) }}
            bands={comparison.bands.map((b) => ({ centreHz: b.centreHz, nominal: b.nominal, low: (b.left + b.right) / 2 - last.test.limitDb / 2, high: (b.left + b.right) / 2 + last.test.limitDb / 2 }))}
            limitDb={last.test.limitDb}
            minHz={model.responseMinHz}
            maxHz={model.responseMaxHz}
          />
          <div className="mt-4">
            <DataTable
              caption="Band by band"
              testId="final-test-bands"
              columns={[
                { key: "band", label: "Band" },
                { key: "left", label: "Left, dB", numeric: true },
                { key: "right", label: "Right, dB", numeric: true },
                { key: "diff", label: "|L − R|, dB", numeric: true },
              ]}
              rows={comparison.bands.map((b) => ({
                id: b.nominal,
                cells: {
                  band: { value: b.centreHz, display: bandLabel(b.nominal) },
                  left: { value: b.left, display: b.left.toFixed(2) },
                  right: { value: b.right, display: b.right.toFixed(2) },
                  diff: { value: Math.abs(b.diffDb), display: <span className={Math.abs(b.diffDb) > last.test.limitDb + 1e-9 ? "font-bold text-danger" : undefined}>{Math.abs(b.diffDb).toFixed(2)}</span> },
                },
              }))}
            />
          </div>
        </Panel>
      ) : null}
      <Panel title="Test a pair">
        <FinalTestForm pair={sp.result ? "" : (sp.pair ?? waiting[0]?.identity ?? "")} />
      </Panel>
      <Panel title="Built and waiting for the test">
        {waiting.length ? (
          <ul className="flex flex-col gap-1" data-testid="awaiting-test">
            {waiting.map((p) => (
              <li key={p.identity}>
                <Link className="serial font-bold text-leaf-dark underline" href={`/lab/final-test?pair=${encodeURIComponent(p.identity)}`}>
                  {p.identity}
                </Link>{" "}
                {p.model} {p.name}, since {formatDay(p.createdAt)}
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-ink-soft">No pair is waiting.</p>
        )}
      </Panel>
    </div>
  );
}
