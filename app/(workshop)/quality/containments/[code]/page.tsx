import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { AffectedGroupTable, type AffectedLine } from "@/components/quality/affected-group";
import { ContainmentTextForm } from "@/components/quality/containment-forms";
import { ProgressBar, ProgressChart } from "@/components/quality/containment-progress";
import { TextWithSerials } from "@/components/register/serial-link";
import { SafetyCautions } from "@/components/shell/safety-cautions";
import { Badge } from "@/components/ui/badge";
import { BackLink } from "@/components/ui/back-link";
import { buttonClasses } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { PageHeader, Panel } from "@/components/ui/panel";
import { TD, TH, TR, Table } from "@/components/ui/table";
import { getDb } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { now } from "@/lib/clock";
import { CONTAINMENT_PAGE_ROWS, containmentPageData, type ContainmentPageData } from "@/lib/containments";
import { formatWhen, timesNote } from "@/lib/format";
import { paths } from "@/lib/paths";
import { AFFECTED_GROUPS, GROUP_EFFECT, GROUP_LABEL, isDispositioned, SEVERITY_LABEL, SEVERITY_MEANING, SEVERITY_TONE, type AffectedGroup } from "@/lib/vocabulary/containments";
import { kindLabel, stateLabel } from "@/lib/vocabulary/item-kinds";
import { closeContainmentAction, moveAffectedAction, sendNoticesAction } from "./actions";

export const metadata: Metadata = { title: "Containment" };

const sentenceCase = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

/** Rows per group on one page: enough to work through, never thousands of tick boxes at once. */
const PAGE = CONTAINMENT_PAGE_ROWS;
const MOST = 2000;

const DELIVERY_WORDS = { sent: "Delivered to the mail server", pending: "Waiting to be sent", failed: "Could not be delivered" } as const;

// Common practice with a part that may hurt someone; the site's own rules and qualified people come first.
const CRITICAL_CAUTIONS = [
  "Treat every affected speaker as unsafe until it is inspected: keep held ones off the test bench and out of the listening room.",
  "Inspect with the speaker disconnected from any amplifier, and let the crossover's capacitors discharge first; a part that has overheated can be hot, charred or give off fumes.",
  "Tell owners plainly to disconnect the speaker and stop using it until it has been checked.",
  "Floor-standing cabinets are heavy: lift them with two people or a lifting aid.",
];

async function dataOr404(code: string, shown: Record<AffectedGroup, number>): Promise<ContainmentPageData> {
  try {
    return await containmentPageData(getDb(), code, shown);
  } catch (e) {
    if (e instanceof AppError && e.status === 404) notFound();
    throw e;
  }
}

/** How many rows of a group to show: ?in_build=400 and so on, a whole page at a time, capped. */
function shownOf(sp: Record<string, string | string[] | undefined>, group: AffectedGroup): number {
  const v = Number(typeof sp[group] === "string" ? sp[group] : PAGE);
  return Number.isInteger(v) && v > 0 ? Math.min(Math.ceil(v / PAGE) * PAGE, MOST) : PAGE;
}

export default async function ContainmentPage({ params, searchParams }: { params: Promise<{ code: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const user = await requirePage("register.read");
  const canWork = user.permissions.has("quality.work");
  const sp = await searchParams;
  const at = now();
  const shown = Object.fromEntries(AFFECTED_GROUPS.map((g) => [g, shownOf(sp, g)])) as Record<AffectedGroup, number>;
  const { c, groups: byGroup, notices, dealers } = await dataOr404(pageParam((await params).code), shown);
  const groups = AFFECTED_GROUPS.map((g) => byGroup[g]);
  const { total, dispositioned } = c.progress;
  const open = !c.closedAt;
  const allDone = total > 0 && dispositioned === total;
  const moreHref = (g: AffectedGroup) => {
    const q = new URLSearchParams(Object.entries(sp).flatMap(([k, v]) => (typeof v === "string" ? [[k, v]] : [])));
    q.set(g, String(shown[g] + PAGE));
    return `${paths.containment(c.code)}?${q.toString()}#group-${g}`;
  };

  return (
    <div className="flex flex-col gap-6" data-testid="containment-page">
      <BackLink href={paths.containments}>Containments</BackLink>
      <PageHeader
        title={
          <span>
            Containment <span className="serial">{c.code}</span>{" "}
            <Badge tone={open ? "caution" : "leaf"}>
              <span data-testid="containment-status">{open ? "Open" : "Closed"}</span>
            </Badge>
          </span>
        }
        lead={<TextWithSerials text={c.targetLabel} />}
      />
      {c.severity === "critical" && open ? <SafetyCautions cautions={CRITICAL_CAUTIONS} /> : null}

      <div className="grid gap-6 lg:grid-cols-2">
        <Panel title="What is suspect">
          <dl className="grid gap-x-4 gap-y-1 sm:grid-cols-[max-content_1fr] sm:gap-y-2" data-testid="containment-facts">
            <dt className="font-bold">Target</dt>
            <dd>
              <TextWithSerials text={c.targetLabel} />
            </dd>
            <dt className="font-bold">Severity</dt>
            <dd>
              <Badge tone={SEVERITY_TONE[c.severity]}>{SEVERITY_LABEL[c.severity]}</Badge> <span className="text-sm text-ink-soft">{SEVERITY_MEANING[c.severity]}</span>
            </dd>
            <dt className="font-bold">Why</dt>
            <dd className="whitespace-pre-line">{c.reason}</dd>
            <dt className="font-bold">Raised</dt>
            <dd>
              {formatWhen(c.raisedAt, at)} by {c.raisedByName}
            </dd>
            {c.closedAt ? (
              <>
                <dt className="font-bold">Closed</dt>
                <dd data-testid="containment-closed">
                  {formatWhen(c.closedAt, at)}, approved by {c.approvedByName}: “{c.closeReason}”
                </dd>
              </>
            ) : null}
          </dl>
          <p className="mt-2 text-sm text-ink-soft">{timesNote()}</p>
        </Panel>
        <Panel title="Progress">
          <div className="flex flex-col gap-4" data-testid="containment-progress">
            <p className="text-lg">
              <span className="font-bold">{dispositioned}</span> of <span className="font-bold">{total}</span> affected serial{total === 1 ? "" : "s"} dealt with (cleared, replaced, or failed with a service case).
            </p>
            <ProgressBar done={dispositioned} total={total} />
            <ProgressChart cells={c.progress.cells} total={total} />
          </div>
        </Panel>
      </div>

      {AFFECTED_GROUPS.map((g, i) => {
        const rows = groups[i]!;
        const count = c.progress.byGroup[g];
        const lines: AffectedLine[] = rows.map((r) => ({
          serial: r.serial,
          kind: kindLabel(r.kind),
          pair: r.pair,
          now: sentenceCase(stateLabel(r.itemState)),
          whereabouts: r.dealer || r.owner ? [r.dealer ? `${r.dealer.name}, ${r.dealer.city}` : null, r.owner ? `owner ${r.owner}` : null].filter(Boolean).join("; ") : null,
          state: r.state,
          done: !open || isDispositioned({ state: r.state, caseId: r.caseCode }),
          // Until it first moves, its event is the raise, whose reason is the containment's own.
          last: r.state === "open" ? null : `${formatWhen(r.at, at)}${r.by ? `, ${r.by}` : ""}${r.note ? `: “${r.note}”` : ""}`,
          caseCode: r.caseCode,
          caseHref: r.caseCode ? paths.serviceCase(r.caseCode) : null,
        }));
        return (
          <section key={g} id={`group-${g}`} aria-labelledby={`heading-${g}`} className="rounded-xl border border-line bg-surface p-5" data-testid={`group-${g}`}>
            <div className="mb-3 flex flex-wrap items-baseline justify-between gap-3">
              <h2 id={`heading-${g}`} className="text-xl font-bold">
                {GROUP_LABEL[g]} <span className="text-base font-normal text-ink-soft">({count})</span>
              </h2>
              {count ? <ProgressBar done={c.progress.dispositionedByGroup[g]} total={count} /> : null}
            </div>
            <p className="mb-3 text-ink-soft">{GROUP_EFFECT[g]}</p>
            {count ? (
              <div className="flex flex-col gap-3">
                <AffectedGroupTable code={c.code} group={g} lines={lines} total={count} canWork={canWork && open} shipped={g === "shipped"} action={moveAffectedAction} />
                {count > rows.length ? (
                  <p className="text-sm">
                    Showing {rows.length} of {count}.{" "}
                    {rows.length < MOST ? (
                      <Link className="text-leaf-dark underline" href={moreHref(g)} data-testid={`more-${g}`}>
                        Show {Math.min(PAGE, count - rows.length)} more
                      </Link>
                    ) : (
                      "Use the export below for the whole list."
                    )}
                  </p>
                ) : null}
              </div>
            ) : (
              <p>None.</p>
            )}
          </section>
        );
      })}

      <Panel title="Notices">
        <div className="flex flex-col gap-5">
          {notices.length ? (
            <Table data-testid="notices-table">
              <caption className="sr-only">Who was told</caption>
              <thead>
                <tr>
                  <TH>To</TH>
                  <TH>E-mail</TH>
                  <TH className="text-right">Serials</TH>
                  <TH>Queued</TH>
                  <TH>Delivery</TH>
                </tr>
              </thead>
              <tbody>
                {notices.map((n, k) => (
                  <TR key={k}>
                    <TD>
                      {n.name} <span className="text-sm text-ink-soft">({n.to === "dealer" ? "dealer" : "owner"})</span>
                    </TD>
                    <TD className="break-all">{n.email || "—"}</TD>
                    <TD className="text-right">{n.serials}</TD>
                    <TD className="min-w-32">
                      {formatWhen(n.queuedAt, at)}
                      {n.by ? `, ${n.by}` : ""}
                    </TD>
                    <TD className="min-w-32">
                      {DELIVERY_WORDS[n.status]}
                      {n.sentAt ? `, ${formatWhen(n.sentAt, at)}` : ""}
                    </TD>
                  </TR>
                ))}
              </tbody>
            </Table>
          ) : (
            <p data-testid="no-notices">No one has been told yet.</p>
          )}
          {canWork && open ? (
            <ContainmentTextForm
              code={c.code}
              action={sendNoticesAction}
              field="ownerWords"
              label="Words for owners (optional)"
              hint="In plain words: what may be wrong and what the owner should do. Each dealer gets one message listing its serials; each registered owner who agreed to be contacted gets one message. Anyone already told is not told twice."
              button="Send notices"
              pendingLabel="Queuing…"
              testId="notices-form"
              variant="secondary"
            />
          ) : null}
        </div>
      </Panel>

      <Panel title="Exports">
        <ul className="flex flex-col gap-2" data-testid="containment-exports">
          <li className="flex flex-wrap gap-x-4 gap-y-1">
            <span className="font-bold">Every affected serial:</span>
            <a className="text-leaf-dark underline" href={paths.containmentCsv(c.code)}>
              Spreadsheet (CSV)
            </a>
            <a className="text-leaf-dark underline" href={paths.containmentEpcis(c.code)}>
              Events (EPCIS 2.0, JSON)
            </a>
          </li>
          {dealers.map((d) => (
            <li key={d.code} className="flex flex-wrap gap-x-4 gap-y-1">
              <span className="font-bold">
                {d.name}, {d.city} ({d.serials} serial{d.serials === 1 ? "" : "s"}):
              </span>
              <a className="text-leaf-dark underline" href={paths.containmentCsv(c.code, d.code)}>
                Spreadsheet (CSV)
              </a>
              <a className="text-leaf-dark underline" href={paths.containmentEpcis(c.code, d.code)}>
                Events (EPCIS 2.0, JSON)
              </a>
            </li>
          ))}
        </ul>
      </Panel>

      {open ? (
        <Panel title="Close the containment">
          {!canWork ? (
            <p>Quality closes a containment once every affected serial is dealt with.</p>
          ) : allDone ? (
            <ContainmentTextForm
              code={c.code}
              action={closeContainmentAction}
              field="reason"
              label="Why it can close"
              hint="What was found and what was done. You are recorded as the approver."
              button={`Close ${c.code}`}
              pendingLabel="Closing…"
              testId="close-form"
            />
          ) : (
            <Notice tone="info" testId="close-not-yet">
              {total - dispositioned} of {total} affected serial{total === 1 ? " is" : "s are"} still to be dealt with. The containment closes once every one is cleared, replaced, or failed with a service case.
            </Notice>
          )}
        </Panel>
      ) : null}
      {canWork && !open ? (
        <p>
          <Link className={buttonClasses("secondary")} href={paths.containments}>
            All containments
          </Link>
        </p>
      ) : null}
    </div>
  );
}
