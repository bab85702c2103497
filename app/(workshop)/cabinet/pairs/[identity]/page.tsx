import { paths } from "@/lib/paths";
import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { SafetyCautions } from "@/components/shell/safety-cautions";
import { SerialLink } from "@/components/register/serial-link";
import { ContainmentHold } from "@/components/register/containment-hold";
import { Badge } from "@/components/ui/badge";
import { BackLink } from "@/components/ui/back-link";
import { DataTable } from "@/components/ui/data-table";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { now } from "@/lib/clock";
import { formatAllowedFrom, formatWhen, timesNote } from "@/lib/format";
import { itemByIdentity } from "@/lib/genealogy/graph";
import { holdsOn } from "@/lib/containments";
import { stateLabel } from "@/lib/vocabulary/item-kinds";
import { STATION_CAUTIONS } from "@/lib/route/cautions";
import { nextStepNow, readingValueText, windowText } from "@/lib/route/rules";
import { recordedNotice, routeOf } from "@/lib/route/pair-route";
import { routedKindOf } from "@/lib/route/routed-group";
import { groupWords, HOLDER_WORD } from "@/lib/route/group-words";
import { ROUTE_KIND_LABEL } from "@/lib/vocabulary/route-kinds";
import { dispositionSummary } from "@/lib/route/nonconformances";
import { correctionsOf, entryErrorsReady, recordAuthors } from "@/lib/route/corrections";
import { ncWhere } from "@/lib/route/words";
import { DispositionForm } from "@/app/(workshop)/quality/disposition-form";
import { RepartnerForm } from "./repartner-form";
import { StepForm } from "./step-form";
import { CorrectionForm, type CorrectableRecord } from "./correction-form";

export async function generateMetadata({ params }: { params: Promise<{ identity: string }> }): Promise<Metadata> {
  return { title: `Route of ${pageParam((await params).identity)}` };
}

/** "Wet film thickness" → "wet film thickness" inside a sentence. */
const lcFirstWord = (s: string) => s.charAt(0).toLowerCase() + s.slice(1);

type Search = Promise<Record<string, string | string[] | undefined>>;
const one = (v: string | string[] | undefined) => (typeof v === "string" ? v : undefined);

export default async function PairRoutePage({ params, searchParams }: { params: Promise<{ identity: string }>; searchParams: Search }) {
  const user = await requirePage("register.read");
  const db = getDb();
  const identity = pageParam((await params).identity);
  const pair = await itemByIdentity(db, identity);
  const kind = pair ? await routedKindOf(db, pair) : null;
  if (!pair || !kind) notFound();
  // A lacquer cabinet made in a batch travels the route alone until assembly pairs it; a trim part
  // travels its own model's trim route alone: both are a group of one.
  const lone = kind !== "pair";
  const trim = kind === "trim_part";
  const at = now();
  const route = await routeOf(db, pair, at);
  // An open containment holding the pair (or a cabinet of it): shown, and no step is offered.
  const holds = await holdsOn(db, [pair.id]);
  const steps = route.spec.steps;
  const pos = route.position;
  const nextSeq = Math.min(...pos.cabinets.map((c) => c.next?.seq ?? Infinity));
  // A lacquer pair is made at assembly from cabinets that already finished: nothing to record here.
  const pairedAtAssembly = pair.attrs.pairedAt === "assembly";
  const next = Number.isFinite(nextSeq) && !pairedAtAssembly ? steps.find((s) => s.seq === nextSeq)! : null;
  // Who may do the next step now, and why the others may not: the words of the refusal a record would get.
  const allowed = nextStepNow(steps, route.history, route.cabinets.map((c) => c.side), at);
  const canWork = user.permissions.has("cabinet.work");
  const openNcs = route.ncs.filter((n) => !n.disposition);
  const cabinetOf = (side: "L" | "R") => route.cabinets.find((c) => c.side === side);
  const stepName = (seq: number) => steps.find((s) => s.seq === seq)?.name ?? null;
  // What the last form recorded (a step, or quality's disposition), read back from the register.
  const search = await searchParams;
  const recordedId = Number(one(search.recorded));
  const recorded = Number.isInteger(recordedId) && recordedId > 0 ? recordedNotice(route, recordedId) : null;
  const dispositioned = one(search.dispositioned);
  const disposedText = dispositioned ? await dispositionSummary(db, dispositioned, { pairId: pair.id }) : null;
  // Corrections of mistyped readings: shown beside the record they correct, the original struck through.
  const [corrections, authors, entryErrors] = await Promise.all([correctionsOf(db, pair.id), recordAuthors(db, route.records.map((r) => r.eventId)), entryErrorsReady(db, openNcs)]);
  const correctedId = Number(one(search.corrected));
  const justCorrected = Number.isInteger(correctedId) ? corrections.find((c) => c.id === correctedId) : undefined;
  const justCorrectedNc = justCorrected ? route.ncs.find((n) => n.recordId === justCorrected.recordId && !n.disposition) : undefined;
  const justCorrectedStep = justCorrected ? steps.find((s) => s.seq === route.records.find((r) => r.id === justCorrected.recordId)?.seq) : undefined;
  const justCorrectedWhat = justCorrected ? justCorrected.changed.map((k) => (k === "startedAt" ? "the start time" : lcFirstWord(justCorrectedStep?.readings.find((x) => x.key === k)?.label ?? k))).join(", ") : "";
  const asQuality = user.permissions.has("quality.work");
  const correctable: CorrectableRecord[] = route.records
    .filter((r) => asQuality || (canWork && authors.get(r.eventId) === user.id))
    .filter((r) => (steps.find((s) => s.seq === r.seq)?.readings.length ?? 0) > 0)
    .sort((a, b) => b.id - a.id)
    .map((r) => {
      const step = steps.find((s) => s.seq === r.seq)!;
      return {
        id: r.id,
        startedMinutesBefore: Math.max(0, Math.round((r.recordedAt.getTime() - r.startedAt.getTime()) / 60_000)),
        label: `Step ${r.seq}, ${step.name} · recorded ${formatWhen(r.recordedAt, at)}${r.cabinets.length === 1 && !lone ? ` (${r.cabinets[0]!.side === "L" ? "left" : "right"})` : ""}`,
        readings: step.readings.map((x) => ({ key: x.key, label: x.label, kind: x.kind, unit: x.unit, window: windowText(x), current: r.readings[x.key] === undefined ? "none" : readingValueText(x, r.readings[x.key]!) })),
      };
    });
  return (
    <div className="flex flex-col gap-6" data-testid="route-page">
      <BackLink href={paths.cabinet}>Cabinet shop</BackLink>
      <PageHeader
        title={<span className="serial" data-testid="route-pair">{pair.identity}</span>}
        lead={`${route.model.code} ${route.model.name}${route.finishName ? ` · ${route.finishName}` : ""}${trim ? ` · trim part (${pair.partType})` : ""} · ${ROUTE_KIND_LABEL[route.group.routeKind].toLowerCase()} version ${route.spec.version}${route.started ? "" : " (fixed when the first step is recorded)"}`}
        actions={<Badge tone={pos.openNcs.length || holds.length ? "danger" : pos.finished ? "leaf" : "info"}>{pos.openNcs.length || holds.length ? "on hold" : pos.finished ? "route finished" : stateLabel(pair.state)}</Badge>}
      />
      <ContainmentHold holds={holds} identity={pair.identity} />
      {recorded ? (
        <Notice tone={recorded.nc ? "caution" : "leaf"} testId="step-done">
          {recorded.text}
        </Notice>
      ) : null}
      {justCorrected ? (
        <Notice tone={justCorrectedNc ? "caution" : "leaf"} testId="correction-done">
          Corrected {justCorrectedWhat}.{" "}
          {justCorrectedNc
            ? entryErrors.has(justCorrectedNc.id)
              ? `Every reading of the step is inside its window now: quality may close ${justCorrectedNc.code} as an entry error.`
              : `${justCorrectedNc.code} holds ${lone ? "the cabinet" : "the pair"} until quality dispositions it.`
            : ""}
        </Notice>
      ) : null}
      {disposedText ? (
        <Notice tone="leaf" testId="disposition-recorded">
          {disposedText}
        </Notice>
      ) : null}
      {trim ? (
        <Notice tone="info">A metal trim part from supplier&apos;s lot {String(pair.attrs.lot ?? "not recorded")}: it travels the trim-part route on its own, and assembly fits it once the route is finished.</Notice>
      ) : lone ? <Notice tone="info">A lacquer cabinet made in a batch: it travels the route on its own, and assembly pairs it with another finished cabinet of its model and colour.</Notice> : null}
      <div className="grid gap-4 md:grid-cols-2" data-testid="route-cabinets">
        {(lone ? (["L"] as const) : (["L", "R"] as const)).map((side) => {
          const c = cabinetOf(side);
          const p = pos.cabinets.find((x) => x.side === side);
          return (
            <div key={side} className="rounded-lg border border-line bg-surface p-4">
              <p className="font-bold">{trim ? "This trim part" : lone ? "This cabinet" : side === "L" ? "Left cabinet" : "Right cabinet"}</p>
              {c ? (
                <>
                  <SerialLink identity={c.item.identity} />
                  <p className="mt-1">{p?.next ? `Next: ${p.next.seq}. ${p.next.name}` : "Route finished."}</p>
                  {p?.holdUntil ? (
                    <p className="text-caution" data-testid={`hold-${side}`}>
                      {p.next?.station === "lacquer" ? "Next coat" : "Next step"} not before {formatAllowedFrom(p.holdUntil, at)} ({p.holdLabel})
                    </p>
                  ) : null}
                  <p className="text-sm text-ink-soft">{p?.done.length ?? 0} of {steps.length} steps done</p>
                </>
              ) : (
                <p className="text-danger" data-testid="unpartnered">No cabinet: the pair is unpartnered until quality signs off a new partner.</p>
              )}
            </div>
          );
        })}
      </div>

      {openNcs.length ? (
        <Notice tone="danger" testId="route-hold">
          On hold: {openNcs.map((n) => `${n.code}, opened ${ncWhere(n.seq, stepName(n.seq))} (${n.finding})`).join("; ")}. Quality dispositions {openNcs.length === 1 ? "it" : "them"} before the next step.
        </Notice>
      ) : null}

      {next ? (
        <Panel title={`Next step: ${next.seq}. ${next.name}`}>
          {next.note ? <p className="mb-3 text-ink-soft">{next.note}</p> : null}
          <div className="mb-4">
            <SafetyCautions cautions={STATION_CAUTIONS[next.station] ?? []} />
          </div>
          {allowed.blocked ? (
            <Notice tone="caution" className="mb-4" testId="step-blocked">
              {groupWords(kind, allowed.blocked.reason)}
            </Notice>
          ) : null}
          {holds.length ? (
            <p className="text-ink-soft" data-testid="step-held">
              No step is recorded while the containment holds {HOLDER_WORD[kind]}.
            </p>
          ) : canWork && allowed.ready.length ? (
            <StepForm
              // A new form after each record: a refusal shown before it does not outlive it.
              key={`${next.seq}:${route.records.length}`}
              pair={pair.identity}
              pairId={pair.id}
              step={next}
              sides={(["L", "R"] as const)
                .filter((s) => cabinetOf(s))
                .map((s) => {
                  const c = pos.cabinets.find((x) => x.side === s);
                  const note = c?.next?.seq !== next.seq ? "not at this step" : c.holdUntil ? `on hold until ${formatAllowedFrom(c.holdUntil, at)}` : "on hold";
                  return { side: s, identity: cabinetOf(s)!.item.identity, ready: allowed.ready.includes(s), note };
                })}
              window={Object.fromEntries(next.readings.map((r) => [r.key, windowText(r)]))}
              memberLabel={trim ? "Trim part" : "Cabinet"}
            />
          ) : canWork ? null : (
            <p className="text-ink-soft">Steps are recorded by the cabinet shop.</p>
          )}
        </Panel>
      ) : (
        <Notice tone="leaf">{pairedAtAssembly ? "Paired at assembly from two finished lacquer cabinets." : trim ? "The trim part has finished its route: it is ready to be fitted at assembly." : lone ? "The cabinet has finished the route: assembly pairs it with another finished cabinet." : "Both cabinets have finished the route: the pair is ready for assembly."}</Notice>
      )}

      {user.permissions.has("quality.work") && openNcs.length ? (
        <Panel title="Disposition">
          {openNcs.map((n) => (
            <div key={n.id} className="mb-4">
              <p className="mb-2 font-bold">
                {n.code}: {n.finding}
              </p>
              <DispositionForm nc={{ id: n.id, code: n.code, seq: n.seq, entryError: entryErrors.get(n.id) ?? null }} steps={steps.filter((s) => s.seq <= n.seq).map((s) => ({ seq: s.seq, name: s.name }))} sides={route.cabinets.map((c) => ({ side: c.side, identity: c.item.identity }))} back={paths.cabinetPair(pair.identity)} />
            </div>
          ))}
        </Panel>
      ) : null}

      {user.permissions.has("quality.work") && !lone && route.cabinets.length < 2 ? (
        <Panel title="A new partner">
          <RepartnerForm pair={pair.identity} pairId={pair.id} />
        </Panel>
      ) : null}

      <Panel title="Route">
        <ol className="grid gap-1 sm:grid-cols-2 lg:grid-cols-3" data-testid="route-steps">
          {steps.map((s) => {
            const doneBy = pos.cabinets.filter((c) => c.done.includes(s.seq)).map((c) => c.side);
            return (
              <li key={s.seq} className={doneBy.length === pos.cabinets.length && doneBy.length ? "text-ink-soft" : s.seq === nextSeq ? "font-bold" : ""}>
                {doneBy.length === pos.cabinets.length && doneBy.length ? "✓" : doneBy.length ? "½" : s.seq === nextSeq ? "→" : "·"} {s.seq}. {s.name}
                {s.holdAfter ? <span className="text-sm text-ink-soft"> (then {s.holdAfter.label})</span> : null}
              </li>
            );
          })}
        </ol>
      </Panel>

      {correctable.length ? (
        <Panel title="Correct a mistyped reading">
          <p className="mb-3 text-ink-soft">{asQuality ? "Quality may correct any recorded reading." : "You may correct readings you recorded yourself."} The record stays as it was written: the correction is added beside it with your reason, and the windows are checked again.</p>
          <CorrectionForm key={`${corrections.length}:${route.records.length}`} pair={pair.identity} pairId={pair.id} records={correctable} asQuality={asQuality} />
        </Panel>
      ) : null}

      <Panel title="Recorded steps">
        <DataTable
          caption={`Steps recorded for ${pair.identity}`}
          testId="route-records"
          empty="No step recorded yet."
          initialSort={{ key: "at", dir: "desc" }}
          columns={[
            { key: "at", label: "Recorded" },
            { key: "step", label: "Step" },
            { key: "sides", label: lone ? "Done on" : "Cabinets" },
            { key: "readings", label: "Readings" },
          ]}
          rows={route.records.map((r) => {
            const step = steps.find((s) => s.seq === r.seq);
            return {
              id: String(r.id),
              cells: {
                at: { value: r.recordedAt.getTime(), display: formatWhen(r.recordedAt, at) },
                step: { value: r.seq, display: `${r.seq}. ${step?.name ?? ""}` },
                sides: { value: lone ? HOLDER_WORD[kind] : r.cabinets.map((c) => c.side).join("+") },
                readings: {
                  value: JSON.stringify(r.readings),
                  display: (
                    <span className={r.outOfWindow ? "text-danger" : undefined}>
                      {Object.entries(r.readings)
                        .map(([k, v]) => {
                          const spec = step?.readings.find((x) => x.key === k);
                          return `${spec?.label ?? k}: ${readingValueText(spec, v)}`;
                        })
                        .join(" · ") || "none"}
                      {r.outOfWindow ? " (out of window)" : ""}
                      {corrections
                        .filter((c) => c.recordId === r.id)
                        .map((c) => (
                          <span key={c.id} className="mt-1 block text-sm text-ink-soft" data-testid={`correction-${c.id}`}>
                            Corrected {formatWhen(c.at, at)} by {c.by}:{" "}
                            {c.changed.map((k, i) => {
                              const spec = step?.readings.find((x) => x.key === k);
                              const was = k === "startedAt" ? formatWhen(c.beforeStartedAt, at) : c.before[k] === undefined ? "none" : readingValueText(spec, c.before[k]!);
                              const is = k === "startedAt" ? formatWhen(c.startedAt, at) : readingValueText(spec, c.readings[k]!);
                              return (
                                <span key={k}>
                                  {i ? "; " : ""}
                                  {k === "startedAt" ? "started" : (spec?.label ?? k)} <del>{was}</del> → {is}
                                </span>
                              );
                            })}
                            . Why: {c.reason}
                          </span>
                        ))}
                    </span>
                  ),
                },
              },
            };
          })}
        />
        <p className="mt-2 text-sm text-ink-soft" data-testid="times-note">
          {timesNote()} Now: {formatWhen(at, at)}.
        </p>
      </Panel>
    </div>
  );
}
