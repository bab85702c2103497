import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { SerialLink } from "@/components/register/serial-link";
import { CaseFindingForm } from "@/components/service/case-finding-form";
import { CaseMoves, type MoveChoice } from "@/components/service/case-moves";
import { CasePhotos } from "@/components/service/case-photos";
import { SafetyCautions } from "@/components/shell/safety-cautions";
import { Badge, type Tone } from "@/components/ui/badge";
import { BackLink } from "@/components/ui/back-link";
import { buttonClasses } from "@/components/ui/button";
import { PageHeader, Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { describeEvent } from "@/lib/events/describe";
import { formatCalendarDay, formatDate, formatWhen, timesNote } from "@/lib/format";
import { revisionsOfCase } from "@/lib/certificates/revisions";
import { paths } from "@/lib/paths";
import { unrefundedPayments } from "@/lib/payments/queries";
import { listUploads } from "@/lib/uploads";
import { DESK_MOVES, FINDING_STATES } from "@/lib/service/desk";
import { CASE_MESSAGE_WORDS, OWNER_MAIL_WORDS } from "@/lib/service/messages";
import { caseByCode, caseHistory, caseMessages, caseParticulars, caseTraces, findingsOf } from "@/lib/service/queries";
import { DISPOSITION_WORDS, isDisposition, repairsOfCase } from "@/lib/service/repair";
import { reservationsOfCase } from "@/lib/service/replacements";
import { caseReturnOf } from "@/lib/service/return";
import { warrantyWorking } from "@/lib/service/warranty";
import { CASE_STATE_WORDS, CASE_TRANSITIONS, OPEN_CASE_STATES, type CaseState } from "@/lib/vocabulary/case-states";
import { kindLabel } from "@/lib/vocabulary/item-kinds";
import { CROSSOVER_POSITION, positionName } from "@/lib/vocabulary/positions";
import { SIDE_WORD, SPEAKER_AT } from "@/lib/vocabulary/sides";
import { moveCaseAction, recordFindingAction } from "./actions";

export const metadata: Metadata = { title: "Service case" };

// Common practice at a service bench; the site's own rules and qualified people come first.
const CAUTIONS = [
  "Disconnect the speaker from any amplifier before opening it; let the crossover's capacitors discharge.",
  "Solder crossover boards under fume extraction.",
  "Floor-standing cabinets are heavy: lift them with two people or a lifting aid.",
];

const STATE_TONE: Record<CaseState, Tone> = {
  received: "info",
  diagnosed: "info",
  waiting_part: "caution",
  waiting_payment: "caution",
  repaired: "leaf",
  tested: "leaf",
  sent_back: "leaf",
  closed: "neutral",
  cancelled: "danger",
};

const DELIVERY_WORDS = { sent: "Delivered to the mail server", pending: "Waiting to be sent", failed: "Could not be delivered" } as const;

export default async function CasePage({ params }: { params: Promise<{ code: string }> }) {
  await requirePage("service.work");
  const db = getDb();
  const c = await caseByCode(db, pageParam((await params).code));
  if (!c) notFound();
  const [p, findings, history, traces, photos, sent, reservations, repairs, revisions] = await Promise.all([
    caseParticulars(db, c),
    findingsOf(db, c.id),
    caseHistory(db, c.id),
    caseTraces(db, c),
    listUploads(db, { kind: "case", id: c.id }),
    caseReturnOf(db, c.id),
    reservationsOfCase(db, c.id),
    repairsOfCase(db, c.id),
    revisionsOfCase(db, c.id),
  ]);
  const owedBack = c.state === "cancelled" ? await unrefundedPayments(db, c.id) : 0;
  const held = reservations.filter((r) => !r.endedAt);
  const messages = await caseMessages(db, c.id, history);
  const day = (iso: string) => formatCalendarDay(iso, new Date(0));
  const open = (OPEN_CASE_STATES as readonly string[]).includes(c.state);

  const choices: MoveChoice[] = CASE_TRANSITIONS[c.state]
    .filter((to) => DESK_MOVES.includes(to))
    // Only a repair that is charged waits for payment.
    .filter((to) => to !== "waiting_payment" || (p.warranty !== null && !p.warranty.inWarranty))
    .map((to) => ({
      to,
      needsReason: to === "cancelled" || (to === "diagnosed" && c.state !== "received"),
      hint:
        to === "diagnosed" && c.state === "received"
          ? !findings.length
            ? "Record at least one finding first."
            : p.warranty && !p.warranty.inWarranty
              ? "The owner is told what was found, with the quote if you have made one (out of warranty)."
              : "The owner is told what was found."
          : to === "closed"
            ? "The owner is told the case is closed."
            : undefined,
    }));
  const sides = (["L", "R"] as const).filter((s) => p.item.kind === "pair" || p.item.side === s).map((s) => ({ value: s, label: SPEAKER_AT[s] }));
  const positions = [...(p.model?.positions ?? []).map((x) => ({ value: x.position, label: positionName(x.position) })), { value: CROSSOVER_POSITION, label: positionName(CROSSOVER_POSITION) }];
  const canRepair = ["diagnosed", "waiting_part", "waiting_payment"].includes(c.state);
  const w = p.warranty;

  return (
    <div className="flex flex-col gap-6" data-testid="case-page">
      <BackLink href={paths.service}>Service desk</BackLink>
      <PageHeader
        title={
          <span>
            Case <span className="serial">{c.code}</span>{" "}
            <Badge tone={STATE_TONE[c.state]}>
              <span data-testid="case-state">{CASE_STATE_WORDS[c.state]}</span>
            </Badge>
          </span>
        }
        lead={`${p.item.kind === "pair" ? "The whole pair" : `The ${p.item.side ? SIDE_WORD[p.item.side] : ""} speaker`} came back from the ${c.returnedBy === "owner" ? "owner" : "dealer"} on ${day(c.receivedOn)}.`}
      />
      {open ? <SafetyCautions cautions={CAUTIONS} /> : null}

      <div className="grid gap-6 lg:grid-cols-2">
        <Panel title="What came back">
          <dl className="grid gap-x-4 gap-y-1 sm:grid-cols-[max-content_1fr] sm:gap-y-2" data-testid="case-facts">
            <dt className="font-bold">{kindLabel(p.item.kind)}</dt>
            <dd><SerialLink identity={p.item.identity} /></dd>
            {p.item.kind === "speaker" ? (
              <>
                <dt className="font-bold">Pair</dt>
                <dd><SerialLink identity={p.pair.identity} /></dd>
                <dt className="font-bold">Partner (with the owner)</dt>
                <dd>{p.partner ? <SerialLink identity={p.partner.identity} /> : "—"}</dd>
              </>
            ) : null}
            <dt className="font-bold">Model</dt>
            <dd>{p.model ? `${p.model.name} (${p.model.code})` : "—"}</dd>
            <dt className="font-bold">Shipped to</dt>
            <dd>{p.dealer ? `${p.dealer.name}, ${p.dealer.city}` : "—"}</dd>
            <dt className="font-bold">Owner</dt>
            <dd data-testid="case-owner">
              {p.owner ? (
                <>
                  {p.owner.name}, {p.owner.town} ({p.owner.country}){p.owner.email ? ` · ${p.owner.email}` : " · no e-mail"}
                  <span className="block text-sm text-ink-soft">{p.owner.consent ? (p.owner.consent.given ? "Agrees to be contacted." : "Does not wish to be contacted.") : "Has not said whether they may be contacted."}</span>
                </>
              ) : (
                "Not known"
              )}
            </dd>
            <dt className="font-bold">Symptom</dt>
            <dd className="whitespace-pre-line">{c.symptom}</dd>
          </dl>
        </Panel>
        <Panel title="Warranty">
          {w ? (
            <div data-testid="case-warranty" className="flex flex-col gap-2">
              <p className="text-lg font-bold">{w.inWarranty ? <Badge tone="leaf">In warranty</Badge> : <Badge tone="caution">Out of warranty</Badge>}</p>
              <ul className="list-disc space-y-1 pl-6">
                {warrantyWorking(w, day).map((line) => (
                  <li key={line}>{line}</li>
                ))}
              </ul>
            </div>
          ) : (
            <p>The warranty cannot be worked out: the pair&apos;s shipment or model is not on record.</p>
          )}
        </Panel>
      </div>

      <Panel title="What happens next">
        <div className="flex flex-col gap-4">
          <CaseMoves code={c.code} from={c.state} choices={choices} action={moveCaseAction} />
          <div className="flex flex-wrap gap-3" data-testid="case-next-pages">
            {w && !w.inWarranty && (["diagnosed", "waiting_part", "waiting_payment"].includes(c.state) || (c.state === "received" && findings.length > 0)) ? (
              <Link className={buttonClasses("secondary")} href={paths.serviceQuote(c.code)}>Quote the repair</Link>
            ) : null}
            {c.state === "cancelled" && owedBack > 0 ? (
              <Link className={buttonClasses("primary")} href={paths.serviceQuote(c.code)} data-testid="case-refund-link">
                Refund the owner&apos;s payment
              </Link>
            ) : null}
            {c.state === "repaired" ? <Link className={buttonClasses("primary")} href={paths.serviceRetest(c.code)}>Re-test the pair</Link> : null}
            {c.state === "tested" ? <Link className={buttonClasses("primary")} href={paths.serviceReturn(c.code)}>Send it back</Link> : null}
          </div>
          {!open ? <p>This case is {CASE_STATE_WORDS[c.state].toLowerCase()}: nothing more is done on it.</p> : null}
        </div>
      </Panel>

      {sent ? (
        <Panel title="On its way home">
          <p data-testid="case-return">
            {`Packed in carton ${sent.carton} and shipped to ${sent.sentTo} on ${day(sent.shippedOn)} with ${sent.carrier}, tracking ${sent.tracking} (shipment ${sent.shipment}).`}{" "}
            <Link className="text-leaf-dark underline" href={paths.serviceReturn(c.code)}>
              The shipment
            </Link>
          </p>
        </Panel>
      ) : null}

      <Panel title="Diagnosis">
        <div className="flex flex-col gap-4">
          {findings.length ? (
            <ul className="flex flex-col gap-2" data-testid="case-findings">
              {findings.map((f) => {
                const replaceable = f.position === CROSSOVER_POSITION || p.model?.positions.some((x) => x.position === f.position);
                return (
                  <li key={f.id} className="flex flex-wrap items-center gap-3 rounded-lg border border-line px-3 py-2">
                    <span className="font-bold">{`${SPEAKER_AT[f.side]}, ${positionName(f.position)}`}</span>
                    <span>{f.finding}</span>
                    {replaceable && canRepair ? (
                      <Link className={buttonClasses("secondary", "sm")} href={paths.serviceReplace(c.code, f.side, f.position)}>
                        Find a replacement
                      </Link>
                    ) : null}
                  </li>
                );
              })}
            </ul>
          ) : (
            <p data-testid="no-findings">No finding yet.</p>
          )}
          {FINDING_STATES.includes(c.state) ? <CaseFindingForm code={c.code} sides={sides} positions={positions} action={recordFindingAction} /> : null}
        </div>
      </Panel>

      <Panel title="Parts reserved and replaced">
        {held.length || repairs.length ? (
          <ul className="flex flex-col gap-2" data-testid="case-parts">
            {held.map((r) => (
              <li key={`held-${r.id}`} className="flex flex-wrap items-center gap-3 rounded-lg border border-line px-3 py-2" data-testid="case-reserved">
                <Badge tone="caution">Reserved</Badge>
                <span className="font-bold">{`${SPEAKER_AT[r.side]}, ${positionName(r.position)}`}</span>
                <SerialLink identity={r.serial} bold={false} />
                <span className="text-sm text-ink-soft">since {formatWhen(r.createdAt)}</span>
              </li>
            ))}
            {repairs.map((r) => (
              <li key={`fit-${r.fitted}`} className="flex flex-wrap items-center gap-3 rounded-lg border border-line px-3 py-2" data-testid="case-repair">
                <Badge tone="leaf">Replaced</Badge>
                <span className="font-bold">{`${SPEAKER_AT[r.side]}, ${positionName(r.position)}`}</span>
                <span>
                  <SerialLink identity={r.removed} bold={false} /> out, <SerialLink identity={r.fitted} bold={false} /> in, {formatWhen(r.at)}
                </span>
                {r.disposition ? <span className="text-sm text-ink-soft">{`${isDisposition(r.disposition) ? DISPOSITION_WORDS[r.disposition] : r.disposition}${r.reason ? `: “${r.reason}”` : ""}`}</span> : null}
              </li>
            ))}
          </ul>
        ) : null}
        {revisions.map((r) => (
          <p key={r.id} className="mt-3" data-testid="case-revision">
            <Badge tone="leaf">Certificate</Badge> {`Revision ${r.revision}, issued ${formatWhen(r.issuedAt)}. The owner reads: “${r.repairLine}.”`}
          </p>
        ))}
        {held.length || repairs.length ? null : (
          <p data-testid="no-parts">Nothing reserved or replaced yet.{canRepair && findings.length ? " Find a replacement from a finding above." : ""}</p>
        )}
      </Panel>

      <Panel title="As built and now">
        <p className="mb-3 text-sm text-ink-soft">
          {traces.shippedAt ? `As built: as it left the workshop on ${formatDate(traces.shippedAt, new Date(0))}.` : "It has not shipped, so there is no as-built record."}{" "}
          {traces.removed || traces.fitted ? `${traces.removed} part(s) removed and ${traces.fitted} fitted since.` : "Nothing has been changed since."}
        </p>
        <div className="grid gap-4 md:grid-cols-2" data-testid="case-traces">
          {(
            [
              ["As built", traces.built],
              ["Now", traces.now],
            ] as const
          ).map(([title, parts]) => (
            <div key={title}>
              <h3 className="mb-2 font-bold">{title}</h3>
              <ul className="flex flex-col gap-1">
                {parts.map((part) => (
                  <li
                    key={`${part.holder}-${part.position}-${part.id}`}
                    className={part.change === "same" ? "" : part.change === "removed" ? "rounded bg-danger-soft px-2" : "rounded bg-leaf-soft px-2"}
                    data-change={part.change}
                  >
                    {part.holder ? <span className="text-ink-soft">{part.holder} · {part.position ? positionName(part.position) : ""}: </span> : null}
                    <SerialLink identity={part.identity} bold={false} /> {part.change === "removed" ? <Badge tone="danger">Removed</Badge> : part.change === "fitted" ? <Badge tone="leaf">Fitted</Badge> : null}
                  </li>
                ))}
              </ul>
            </div>
          ))}
        </div>
      </Panel>

      <Panel title="Messages to the owner">
        {messages.length ? (
          <ul className="flex flex-col gap-2" data-testid="case-messages">
            {messages.map((m) => (
              <li key={m.eventId} className="rounded-lg border border-line px-3 py-2">
                <span className="font-bold">{CASE_MESSAGE_WORDS[m.kind as keyof typeof CASE_MESSAGE_WORDS] ?? m.kind}</span>{" "}
                <span className="text-ink-soft">{formatWhen(m.at)}</span>
                <span className="block" data-testid="message-state">
                  {m.outbox ? `${m.outbox.subject} — ${DELIVERY_WORDS[m.outbox.status]}${m.outbox.status === "failed" && m.outbox.lastError ? ` (${m.outbox.lastError})` : ""}` : OWNER_MAIL_WORDS[m.outcome]}
                </span>
              </li>
            ))}
          </ul>
        ) : (
          <p>No message yet.</p>
        )}
        <p className="mt-2 text-sm text-ink-soft">{timesNote()}</p>
      </Panel>

      <Panel title="Photos">
        <div className="flex flex-col gap-3">
          {photos.length ? (
            <ul className="flex flex-wrap gap-3" data-testid="case-photo-list">
              {photos.map((ph) => (
                <li key={ph.id}>
                  <a href={`/api/v1/uploads/${ph.id}`} className="text-leaf-dark underline">
                    {ph.originalName}
                  </a>
                </li>
              ))}
            </ul>
          ) : (
            <p>No photo yet.</p>
          )}
          {open ? <CasePhotos code={c.code} /> : null}
        </div>
      </Panel>

      <Panel title="History">
        <ol className="flex flex-col gap-1" data-testid="case-history">
          {history.map((e) => (
            <li key={e.id}>
              <span className="text-ink-soft">{formatWhen(e.at)}</span> — {e.actorName ?? "The system"} {describeEvent(e.type, e.data)}
              {e.reason ? <span className="text-ink-soft">: “{e.reason}”</span> : null}
            </li>
          ))}
        </ol>
        <p className="mt-2 text-sm text-ink-soft">{timesNote()}</p>
      </Panel>
    </div>
  );
}
