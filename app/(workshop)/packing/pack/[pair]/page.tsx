import { paths, printPaths } from "@/lib/paths";
import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { PrintForm } from "@/components/register/print-form";
import { ContainmentHold } from "@/components/register/containment-hold";
import { SafetyCautions } from "@/components/shell/safety-cautions";
import { BackLink } from "@/components/ui/back-link";
import { buttonClasses } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { areaByKey } from "@/lib/areas";
import { holdsOn } from "@/lib/containments";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { knownLocations, packingLines, pairForPacking, PACKABLE_STATES } from "@/lib/dispatch";
import { stateLabel } from "@/lib/vocabulary/item-kinds";
import { PackForm } from "./pack-form";

export const metadata: Metadata = { title: "Pack a pair" };


export default async function Page({ params, searchParams }: { params: Promise<{ pair: string }>; searchParams: Promise<{ packed?: string }> }) {
  await requirePage("packing.work");
  const db = getDb();
  const { pair: raw } = await params;
  const sp = await searchParams;
  const serial = pageParam(raw);
  const pair = await pairForPacking(db, serial);
  if (!pair) notFound();
  const packable = (PACKABLE_STATES as readonly string[]).includes(pair.state);
  const [lines, locations, holds] = await Promise.all([packingLines(db, pair), knownLocations(db), holdsOn(db, [pair.id])]);
  // A pair tested before final tests were recorded gets its certificate when it is packed.
  const certificateReady = pair.hasCertificate || pair.finalTestPassed;

  return (
    <div className="flex flex-col gap-6" data-testid="pack-page">
      <BackLink href={paths.packing}>Packing</BackLink>
      <PageHeader
        title={<span className="serial">{pair.identity}</span>}
        lead={[`${pair.modelCode} ${pair.model}`.trim(), pair.finish, stateLabel(pair.state)].filter(Boolean).join(" · ")}
      />
      <SafetyCautions cautions={areaByKey("packing").cautions} />
      <ContainmentHold holds={holds} identity={pair.identity} />

      <Panel title="The pair">
        <dl className="grid gap-x-6 gap-y-2 sm:grid-cols-[auto_1fr]">
          <dt className="text-ink-soft">Left speaker</dt>
          <dd className="serial font-bold" data-testid="pair-left">
            {pair.left ?? "—"}
          </dd>
          <dt className="text-ink-soft">Right speaker</dt>
          <dd className="serial font-bold" data-testid="pair-right">
            {pair.right ?? "—"}
          </dd>
          {pair.carton ? (
            <>
              <dt className="text-ink-soft">Carton</dt>
              <dd className="serial font-bold" data-testid="packed-carton">
                {pair.carton}
              </dd>
              <dt className="text-ink-soft">SSCC</dt>
              <dd className="serial" data-testid="packed-sscc">
                {pair.sscc ?? <span className="text-ink-soft">none recorded</span>}
              </dd>
              <dt className="text-ink-soft">Stored at</dt>
              <dd>{pair.location ?? <span className="text-ink-soft">place not recorded</span>}</dd>
            </>
          ) : null}
        </dl>
      </Panel>

      {pair.carton ? (
        <Panel title="Packed">
          {sp.packed ? (
            <Notice tone="leaf" testId="packed" className="mb-4">
              {pair.identity} is packed in carton {pair.carton}
              {pair.location ? `, stored at ${pair.location}` : ""}. Print the carton label and stick it on the carton.
            </Notice>
          ) : null}
          <div className="flex flex-wrap gap-3">
            <PrintForm action={printPaths.cartonLabel(pair.carton)} variant="primary" testId="print-carton-label">
              Print the carton label
            </PrintForm>
            <PrintForm action={printPaths.certificate(pair.identity)} testId="print-certificate">
              {pair.certificatePrints ? "Print a copy of the certificate" : "Print the certificate"}
            </PrintForm>
            <Link href={paths.packing} className={buttonClasses("quiet")}>
              Back to dispatch
            </Link>
          </div>
          <p className="mt-3 text-sm text-ink-soft">
            {pair.certificatePrints
              ? "The certificate has been printed: it goes into the carton. A new print is marked COPY."
              : "Print the certificate now and put it in before the carton is closed: it names the packer and the date."}
          </p>
        </Panel>
      ) : packable && !holds.length ? (
        <Panel title="Pack it">
          <div className="mb-5 flex flex-wrap items-center gap-3">
            {certificateReady ? (
              <PrintForm action={printPaths.certificate(pair.identity)} testId="print-certificate">
                Print the certificate
              </PrintForm>
            ) : null}
            <p className="text-sm text-ink-soft">
              {certificateReady
                ? "Print the certificate first: it goes into the carton with the speakers. It opens as a PDF in a new tab."
                : "This pair was tested before final tests were recorded: its certificate is issued when it is packed. Pack it, then print the certificate and put it in before the carton is closed."}
            </p>
          </div>
          <PackForm pair={pair.identity} lines={lines} locations={locations} />
        </Panel>
      ) : holds.length ? null : (
        <Notice tone="caution" testId="not-packable">
          {pair.state === "shipped" ? `${pair.identity} has already shipped.` : `${pair.identity} is ${stateLabel(pair.state)}: only a pair that has passed its final test can be packed.`}
        </Notice>
      )}
    </div>
  );
}
