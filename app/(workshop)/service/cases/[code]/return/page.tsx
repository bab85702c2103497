import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { PrintForm } from "@/components/register/print-form";
import { ReturnForm } from "@/components/service/return-form";
import { BackLink } from "@/components/ui/back-link";
import { Notice } from "@/components/ui/notice";
import { PageHeader, Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { now } from "@/lib/clock";
import { formatCalendarDay } from "@/lib/format";
import { paths, printPaths } from "@/lib/paths";
import { caseByCode, caseParticulars } from "@/lib/service/queries";
import { caseReturnOf } from "@/lib/service/return";
import { CASE_STATE_WORDS } from "@/lib/vocabulary/case-states";
import { workshopDay } from "@/lib/workshop-time";
import { sendBackAction } from "./actions";

export const metadata: Metadata = { title: "Send it back" };

/** The way home: a tested case is packed in a carton with its label and shipped to the owner or the dealer. */
export default async function Page({ params }: { params: Promise<{ code: string }> }) {
  const user = await requirePage("service.work");
  const db = getDb();
  const c = await caseByCode(db, pageParam((await params).code));
  if (!c) notFound();
  const [p, sent] = await Promise.all([caseParticulars(db, c), caseReturnOf(db, c.id)]);
  const what = p.item.kind === "pair" ? `the pair ${p.item.identity}` : `the ${p.item.side === "L" ? "left" : "right"} speaker ${p.item.identity}`;
  const choices = [
    ...(p.owner ? [{ value: "owner" as const, label: `The owner: ${p.owner.name}, ${p.owner.town} (${p.owner.country})` }] : []),
    ...(p.dealer ? [{ value: "dealer" as const, label: `The dealer: ${p.dealer.name}, ${p.dealer.city}` }] : []),
  ];
  return (
    <div className="flex flex-col gap-6" data-testid="return-page">
      <BackLink href={paths.serviceCase(c.code)}>{`Case ${c.code}`}</BackLink>
      <PageHeader title="Send it back" lead={`Pack ${what} in a new carton with its label, and ship it to the owner or to the dealer. The owner is told it is on its way.`} />
      <Notice tone="info">Floor-standing cabinets are heavy: lift and carton them with two people or a lifting aid, and follow the site&apos;s safety rules and its qualified people.</Notice>
      {sent ? (
        <Panel title="Shipped">
          <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1" data-testid="return-shipment">
            <dt className="font-bold">To</dt>
            <dd>{sent.sentTo}</dd>
            <dt className="font-bold">Carton</dt>
            <dd className="serial">{sent.carton}</dd>
            <dt className="font-bold">Shipment</dt>
            <dd className="serial">{sent.shipment}</dd>
            <dt className="font-bold">Left on</dt>
            <dd>{formatCalendarDay(sent.shippedOn, new Date(0))}</dd>
            <dt className="font-bold">Carrier</dt>
            <dd>{`${sent.carrier}, tracking ${sent.tracking}`}</dd>
          </dl>
          {user.permissions.has("cartons.print") ? (
            <div className="mt-4">
              <PrintForm action={printPaths.cartonLabel(sent.carton)} testId="return-print-label">
                Print the carton label
              </PrintForm>
            </div>
          ) : null}
        </Panel>
      ) : c.state === "tested" ? (
        <Panel title="Pack and ship">
          {choices.length ? (
            <ReturnForm code={c.code} today={workshopDay(now())} choices={choices} action={sendBackAction} />
          ) : (
            <p>The case names neither an owner nor a dealer: record where it goes before it is shipped.</p>
          )}
        </Panel>
      ) : (
        <Notice tone="info" testId="return-not-open">{`The case is “${CASE_STATE_WORDS[c.state]}”: only a case whose pair passed its test again is sent back.`}</Notice>
      )}
    </div>
  );
}
