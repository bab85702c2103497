import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { PairChart } from "@/components/lab/pair-chart-lazy";
import { PrintForm } from "@/components/register/print-form";
import { RetestForm } from "@/components/service/retest-form";
import { BackLink } from "@/components/ui/back-link";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { bandLabel, compareResponses, formatDb, formatHzRange, formatLimitDb } from "@/lib/acoustics";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { formatDay } from "@/lib/format";
import { paths, printPaths } from "@/lib/paths";
import { retestView } from "@/lib/service/retest";
import { CASE_STATE_WORDS } from "@/lib/vocabulary/case-states";
import { retestAction } from "./actions";

export const metadata: Metadata = { title: "Re-test after repair" };

/**
 * The repaired pair's final test again, under the lab's rule. A pass moves the case to "tested"
 * and issues a certificate revision (printed here); a fail shows the figures and what to do next.
 */
export default async function Page({ params }: { params: Promise<{ code: string }> }) {
  const user = await requirePage("service.work");
  const code = pageParam((await params).code);
  const view = await retestView(getDb(), code);
  if (!view || !view.pair || !view.model) notFound();
  const { case: c, pair, model, test, revision } = view;
  const canPrint = user.permissions.has("certificates.print");
  const pts = (r: { points: number[][] }) => r.points.map((p) => [p[0]!, p[1]!] as [number, number]);
  const hzDb = (r: { points: number[][] }) => r.points.map((p) => ({ hz: p[0]!, db: p[1]! }));
  const bands = test ? compareResponses(hzDb(test.left), hzDb(test.right), { minHz: model.responseMinHz, maxHz: model.responseMaxHz, limitDb: test.limitDb }).bands : [];
  return (
    <div className="flex flex-col gap-6" data-testid="retest-page">
      <BackLink href={paths.serviceCase(c.code)}>{`Case ${c.code}`}</BackLink>
      <PageHeader
        title="Re-test after repair"
        lead={`The pair ${pair.identity} (${model.code} ${model.name}) is tested again like a new pair: left and right compared in one-third-octave bands over ${formatHzRange(model.responseMinHz, model.responseMaxHz)}, each band within ${formatLimitDb(model.pairResponseLimitDb)}. A band exactly at the limit passes.`}
      />
      <Notice tone="info">
        Lift the cabinets with two people or a lifting aid, and keep test levels within hearing-safe limits: follow the site&apos;s safety rules and its qualified people.
      </Notice>
      {test ? (
        <Panel title={test.pass ? "Passed" : "Failed"}>
          <Notice tone={test.pass ? "leaf" : "danger"} testId="retest-result" className="mb-4">
            {test.pass
              ? `Passed: the largest difference is ${formatDb(test.maxDiffDb)} at ${bandLabel(test.worstBand)}, within the ${formatLimitDb(test.limitDb)} limit. ${c.state === "tested" ? "The case is now “Tested” and the certificate has a new revision." : `The certificate got a new revision; the case has since moved on to “${CASE_STATE_WORDS[c.state]}”.`}`
              : `Failed: left and right differ by ${formatDb(test.maxDiffDb)} at ${bandLabel(test.worstBand)}, over the ${formatLimitDb(test.limitDb)} limit. The case stays repaired. Check the fitted parts and their connections, and test again; if the fault is elsewhere, move the case back to diagnosis on its page.`}
          </Notice>
          <PairChart
            title={`${model.code} ${model.name}: left and right, ${formatHzRange(model.responseMinHz, model.responseMaxHz)}`}
            a={{ label: "Left", points: pts(test.left) }}
            b={{ label: "Right", points: pts(test.right) }}
            bands={bands.map((x) => ({ centreHz: x.centreHz, nominal: x.nominal, low: (x.left + x.right) / 2 - test.limitDb / 2, high: (x.left + x.right) / 2 + test.limitDb / 2 }))}
            limitDb={test.limitDb}
            minHz={model.responseMinHz}
            maxHz={model.responseMaxHz}
          />
          {test.pass && revision ? (
            <p className="mt-4" data-testid="retest-revision">
              {`Revision ${revision.revision} of the certificate, issued ${formatDay(revision.issuedAt)}. The owner reads: “${revision.repairLine}.”`}
            </p>
          ) : null}
          {test.pass && canPrint ? (
            <div className="mt-4">
              <PrintForm action={printPaths.certificate(pair.identity)} variant="primary" testId="retest-print">
                Print the revised certificate
              </PrintForm>
            </div>
          ) : null}
        </Panel>
      ) : null}
      {c.state === "repaired" ? (
        <Panel title="Test the repaired pair">
          <RetestForm code={c.code} action={retestAction} />
        </Panel>
      ) : (
        <Notice tone="info" testId="retest-not-open">
          {`The case is “${CASE_STATE_WORDS[c.state]}”: only a repaired pair is tested again here.`}
        </Notice>
      )}
    </div>
  );
}
