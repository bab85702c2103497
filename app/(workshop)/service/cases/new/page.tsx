import type { Metadata } from "next";
import { BackLink } from "@/components/ui/back-link";
import { buttonClasses } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { PageHeader, Panel } from "@/components/ui/panel";
import { CaseIntakeForm, type IntakeOwnerOption } from "@/components/service/case-intake-form";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { now } from "@/lib/clock";
import { paths } from "@/lib/paths";
import { findOwners, ownersOfPair, type OwnerWithConsent } from "@/lib/owners";
import { lookUpReturned } from "@/lib/service/intake";
import { listDealers } from "@/lib/workshop/queries";
import { workshopDay } from "@/lib/workshop-time";
import { openCaseAction } from "./actions";

export const metadata: Metadata = { title: "Take in a returned speaker" };

const ownerLabel = (o: OwnerWithConsent) => `${o.name}, ${o.town} (${o.country})${o.email ? ` · ${o.email}` : ""}${o.consent?.given ? "" : " · not to be contacted"}`;

/**
 * Intake: look the serial up first (the pair's owners on record are offered), or search owners by
 * name or e-mail; then open the case. Looking up writes nothing.
 */
export default async function IntakePage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  await requirePage("service.work");
  const sp = await searchParams;
  const serial = typeof sp.serial === "string" ? sp.serial.slice(0, 200) : "";
  const ownerQuery = typeof sp.owner === "string" ? sp.owner.slice(0, 100) : "";
  const db = getDb();
  const found = serial ? await lookUpReturned(db, serial) : null;
  const [pairOwners, searched, dealers] = await Promise.all([
    found?.pairId ? ownersOfPair(db, found.pairId) : Promise.resolve([]),
    ownerQuery ? findOwners(db, ownerQuery) : Promise.resolve([]),
    listDealers(db),
  ]);
  const options: IntakeOwnerOption[] = [];
  for (const o of [...pairOwners, ...searched]) if (!options.some((x) => x.id === o.id)) options.push({ id: o.id, label: ownerLabel(o) });

  return (
    <div className="flex flex-col gap-6" data-testid="intake-page">
      <BackLink href={paths.service}>Service desk</BackLink>
      <PageHeader title="Take in a returned speaker" lead="A speaker, or the whole pair when both come back. The case records what came back, from whom, and why." />
      <Panel title="Look up">
        <form method="get" className="flex flex-wrap items-end gap-3" data-testid="intake-lookup">
          <label className="flex flex-col gap-1.5 font-bold">
            Serial
            <input name="serial" defaultValue={serial} className="min-h-12 rounded-lg border border-line-strong bg-surface px-3" autoComplete="off" />
          </label>
          <label className="flex flex-col gap-1.5 font-bold">
            Owner&apos;s name or e-mail
            <input name="owner" defaultValue={ownerQuery} className="min-h-12 rounded-lg border border-line-strong bg-surface px-3" autoComplete="off" />
          </label>
          <button type="submit" className={buttonClasses("secondary")}>
            Look up
          </button>
        </form>
        {found ? (
          <div className="mt-4" data-testid="intake-found">
            {found.problem ? (
              <Notice tone="caution">{found.problem}</Notice>
            ) : (
              <p>
                {found.words} {pairOwners.length ? `Owners on record: ${pairOwners.length}.` : "No owner is on record for this pair."}
              </p>
            )}
          </div>
        ) : null}
        {ownerQuery && searched.length === 0 ? <p className="mt-2 text-sm text-ink-soft">No owner&apos;s name or e-mail holds “{ownerQuery}”.</p> : null}
      </Panel>
      <Panel title="The case">
        <CaseIntakeForm
          key={`${serial}|${ownerQuery}`}
          action={openCaseAction}
          today={workshopDay(now())}
          serial={found?.identity ?? serial}
          owners={options}
          dealers={dealers.map((d) => ({ code: d.code, label: `${d.name}, ${d.city}` }))}
          shippedDealer={found?.dealer ?? null}
        />
      </Panel>
    </div>
  );
}
