import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { SafetyCautions } from "@/components/shell/safety-cautions";
import { BackLink } from "@/components/ui/back-link";
import { Notice } from "@/components/ui/notice";
import { PageHeader, Panel } from "@/components/ui/panel";
import { ReplaceChart } from "@/components/service/replace-chart-lazy";
import { FitReplacement, MarkRepaired, ReleaseReservation, ReplaceCandidates, ReplaceSets, ReserveBySerial } from "@/components/service/replace-forms";
import { getDb } from "@/db";
import { formatDb, formatHzRange, formatLimitDb } from "@/lib/acoustics/format";
import { areaByKey } from "@/lib/areas";
import { AppError } from "@/lib/auth/errors";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { now } from "@/lib/clock";
import { formatShopTime } from "@/lib/format";
import { paths } from "@/lib/paths";
import { DISPOSITION_WORDS, DISPOSITIONS, repairsOfCase, unrepairedFindings } from "@/lib/service/repair";
import { RESERVING_STATES, replacementView, reservationsOfCase, SIDE_WORD } from "@/lib/service/replacements";
import { CASE_STATE_WORDS } from "@/lib/vocabulary/case-states";
import { positionName } from "@/lib/vocabulary/positions";
import { fitAction, markRepairedAction, releaseAction, reserveAction, reserveSetAction } from "./actions";

export const metadata: Metadata = { title: "Replacement part" };

const first = (v: string | string[] | undefined) => (Array.isArray(v) ? v[0] : v) ?? "";
const weightOf = (v: string) => {
  const n = Number(v || "0");
  return Number.isFinite(n) && n >= 0 && n <= 10 ? n : 0;
};

export default async function ReplacePage({ params, searchParams }: { params: Promise<{ code: string }>; searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  await requirePage("service.work");
  const db = getDb();
  const code = pageParam((await params).code);
  const sp = await searchParams;
  const input = { code, side: first(sp.side), position: first(sp.position), fsWeight: weightOf(first(sp.fs)), qtsWeight: weightOf(first(sp.qts)) };
  let view: Awaited<ReturnType<typeof replacementView>>;
  try {
    view = await replacementView(db, input);
  } catch (e) {
    if (!(e instanceof AppError)) throw e;
    if (e.status === 404) notFound();
    return (
      <div className="flex flex-col gap-6" data-testid="replace-page">
        <BackLink href={paths.serviceCase(code)}>{`Case ${code}`}</BackLink>
        <PageHeader title="Replacement part" />
        <Notice tone="danger" testId="replace-refused">
          {e.message}
        </Notice>
      </div>
    );
  }
  const { place, placeWords } = view;
  const c = place.case;
  const plc = { code: c.code, side: place.side, position: place.slot.slot };
  const weights = { fs: view.fsWeight, qts: view.qtsWeight };
  const canReserve = RESERVING_STATES.includes(c.state);
  const reservations = await reservationsOfCase(db, c.id);
  const open = reservations.filter((r) => r.endedAt === null);
  const here = open.find((r) => r.side === place.side && r.position === place.slot.slot);
  const repairs = await repairsOfCase(db, c.id);
  const { findings, open: unrepaired } = await unrepairedFindings(db, c);
  const byId = view.stock;
  const pts = (p: number[][]) => p.map(([hz, level]) => [hz!, level!] as [number, number]);
  const pass = view.bands.length ? { min: view.bands[0]!.lowerHz, max: view.bands.at(-1)!.upperHz } : null;
  const nowAt = now();

  return (
    <div className="flex flex-col gap-6" data-testid="replace-page">
      <BackLink href={paths.serviceCase(c.code)}>{`Case ${c.code}`}</BackLink>
      <PageHeader
        title={`A replacement for the ${placeWords}`}
        lead={`Case ${c.code}, ${CASE_STATE_WORDS[c.state].toLowerCase()}. Stock is ranked against the part that still sits in the ${SIDE_WORD[place.side === "L" ? "R" : "L"]} speaker, with the lab's own matching: the RMS of the band differences${pass ? ` over ${formatHzRange(pass.min, pass.max)}` : ""}, and only parts within the ${place.model.code}'s ${formatLimitDb(view.limitDb)} limit.`}
      />
      <SafetyCautions cautions={areaByKey("service").cautions} />

      <Panel title="The survivor">
        <dl className="grid grid-cols-[max-content_1fr] gap-x-4 gap-y-1" data-testid="survivor">
          <dt className="font-bold">Serial</dt>
          <dd className="font-mono">{view.survivor.identity}</dd>
          <dt className="font-bold">In</dt>
          <dd>
            the {SIDE_WORD[place.side === "L" ? "R" : "L"]} speaker <span className="font-mono">{view.survivor.speaker}</span>, at its {positionName(place.slot.slot)}
          </dd>
          <dt className="font-bold">Failed part</dt>
          <dd className="font-mono">{view.current?.identity ?? "none fitted now"}</dd>
        </dl>
      </Panel>

      {here ? (
        <Panel title="Reserved for this place">
          <div className="flex flex-col gap-4">
            <p data-testid="reserved-here">
              <span className="font-mono">{here.serial}</span> is held for the {placeWords} since {formatShopTime(here.createdAt, nowAt)}. Neither the lab nor another case can take it.
            </p>
            {view.current && (c.state === "diagnosed" || c.state === "waiting_part") ? (
              <FitReplacement place={plc} reserved={here.serial} current={view.current.identity} dispositions={DISPOSITIONS.map((d) => ({ value: d, label: DISPOSITION_WORDS[d] }))} action={fitAction} />
            ) : c.state === "waiting_payment" ? (
              <Notice tone="info">The case waits for payment: the part is fitted once it is paid.</Notice>
            ) : null}
            <ReleaseReservation place={plc} serial={here.serial} action={releaseAction} />
          </div>
        </Panel>
      ) : null}

      {!here && view.candidates.length ? (
        <Panel title={`Stock within the limit: ${view.candidates.length}`}>
          <div className="flex flex-col gap-4">
            <ReplaceCandidates
              place={plc}
              weights={weights}
              canReserve={canReserve}
              action={reserveAction}
              rows={view.candidates.map((x) => ({ serial: x.id, cost: x.cost, costText: formatDb(x.cost), maxDiffDb: x.maxDiffDb, maxDiffText: formatDb(x.maxDiffDb), band: `at ${view.bandLabels[x.worstBand] ?? "one band"}` }))}
            />
            {pass ? (
              <ReplaceChart
                title={`The survivor and the best ${Math.min(3, view.candidates.length)}`}
                survivor={{ label: view.survivor.identity, points: pts(view.survivor.points) }}
                candidates={view.candidates.slice(0, 3).map((x) => ({ label: x.id, points: pts(byId.get(x.id)!.points) }))}
                minHz={pass.min}
                maxHz={pass.max}
              />
            ) : null}
          </div>
        </Panel>
      ) : null}

      {!here && view.why ? (
        <Panel title="No single part fits">
          <div className="flex flex-col gap-4">
            <Notice tone="caution" testId="why-none">
              {view.why}
            </Notice>
            {view.sets.length ? (
              <ReplaceSets place={plc} weights={weights} canReserve={canReserve} action={reserveSetAction} rows={view.sets.map((s) => ({ left: s.a, right: s.b, costText: formatDb(s.cost), maxDiffText: formatDb(s.maxDiffDb) }))} />
            ) : null}
          </div>
        </Panel>
      ) : null}

      {!here && canReserve ? (
        <Panel title="Reserve a part by its serial">
          <ReserveBySerial place={plc} weights={weights} action={reserveAction} />
        </Panel>
      ) : null}
      {!canReserve && !here ? <Notice tone="info">Parts are reserved while the case is diagnosed, waiting for a part or waiting for payment.</Notice> : null}

      <Panel title="Repairs of this case">
        {repairs.length ? (
          <ul className="flex flex-col gap-1" data-testid="repairs">
            {repairs.map((r) => (
              <li key={`${r.side}${r.position}${r.fitted}`}>
                {SIDE_WORD[r.side]} speaker&apos;s {positionName(r.position)}: <span className="font-mono">{r.removed}</span> out ({r.disposition ? DISPOSITION_WORDS[r.disposition as keyof typeof DISPOSITION_WORDS].toLowerCase() : "taken out"}), <span className="font-mono">{r.fitted}</span> in, {formatShopTime(r.at, nowAt)}
              </li>
            ))}
          </ul>
        ) : (
          <p>No part has been replaced yet.</p>
        )}
        {findings.length && !unrepaired.length && (c.state === "diagnosed" || c.state === "waiting_part" || c.state === "waiting_payment") ? <MarkRepaired place={plc} action={markRepairedAction} /> : null}
      </Panel>
    </div>
  );
}
