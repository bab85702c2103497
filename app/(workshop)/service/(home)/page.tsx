import type { Metadata } from "next";
import Link from "next/link";
import { SerialLink } from "@/components/register/serial-link";
import { Badge } from "@/components/ui/badge";
import { buttonClasses } from "@/components/ui/button";
import { DataTable } from "@/components/ui/data-table";
import { Notice } from "@/components/ui/notice";
import { PageHeader, Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { now } from "@/lib/clock";
import { formatCalendarDay } from "@/lib/format";
import { paths } from "@/lib/paths";
import { ageInDays, isStale, MAX_STALE_DAYS, parseStaleDays, staleDaysSetting } from "@/lib/service/home";
import { listCases } from "@/lib/service/queries";
import { CASE_STATE_WORDS, OPEN_CASE_STATES } from "@/lib/vocabulary/case-states";
import { workshopDay } from "@/lib/workshop-time";

export const metadata: Metadata = { title: "Service desk" };

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? "" : "s"}`;

/**
 * Open cases grouped by state, oldest first, with their age in days; those older than the
 * threshold (TWINLEAF_SERVICE_STALE_DAYS, or ?stale= to try another number) are flagged.
 */
export default async function Page({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  await requirePage("service.work");
  const sp = await searchParams;
  const asked = typeof sp.stale === "string" ? sp.stale : null;
  const tried = asked === null ? null : parseStaleDays(asked);
  const staleDays = tried ?? staleDaysSetting();
  const today = workshopDay(now());
  const cases = (await listCases(getDb())).map((c) => {
    const age = ageInDays(c.receivedOn, today);
    return { ...c, age, stale: isStale(age, staleDays) };
  });
  const staleCount = cases.filter((c) => c.stale).length;

  return (
    <div className="flex flex-col gap-6" data-testid="service-home">
      <PageHeader
        title="Service desk"
        lead="Speakers that have come back, from the day they arrived to their way home."
        actions={
          <Link href={paths.serviceIntake} className={buttonClasses("primary")} data-testid="new-case">
            Take in a returned speaker
          </Link>
        }
      />
      <form method="get" className="flex flex-wrap items-end gap-3" aria-label="Flag cases older than">
        <label className="flex flex-col gap-1.5 font-bold">
          Flag cases open longer than (days)
          <input name="stale" type="number" min={1} max={MAX_STALE_DAYS} step={1} defaultValue={staleDays} className="min-h-12 w-32 rounded-lg border border-line-strong bg-surface px-3" aria-describedby="stale-hint" />
        </label>
        <button type="submit" className={buttonClasses("secondary")}>
          Show
        </button>
        <p id="stale-hint" className="text-sm text-ink-soft">
          The workshop&apos;s setting is {plural(staleDaysSetting(), "day")}.
        </p>
      </form>
      {asked !== null && tried === null ? (
        <Notice tone="danger" testId="stale-refused">
          “{asked.slice(0, 20)}” is not a number of days from 1 to {MAX_STALE_DAYS}; the workshop&apos;s setting of {plural(staleDays, "day")} is used.
        </Notice>
      ) : null}
      <p data-testid="service-summary">
        {cases.length === 0 ? "No open cases." : `${plural(cases.length, "open case")}; ${staleCount} open longer than ${plural(staleDays, "day")}.`}
      </p>
      {OPEN_CASE_STATES.map((state) => {
        const inState = cases.filter((c) => c.state === state);
        if (inState.length === 0) return null;
        return (
          <Panel key={state} title={`${CASE_STATE_WORDS[state]} (${inState.length})`}>
            <DataTable
              caption={`Cases ${CASE_STATE_WORDS[state].toLowerCase()}, oldest first`}
              testId={`cases-${state}`}
              columns={[
                { key: "code", label: "Case" },
                { key: "serial", label: "Came back" },
                { key: "model", label: "Model" },
                { key: "received", label: "Received" },
                { key: "age", label: "Age", numeric: true },
                { key: "symptom", label: "Symptom", cellClassName: "min-w-48" },
              ]}
              rows={inState.map((c) => ({
                id: c.code,
                cells: {
                  code: { value: c.code, display: <Link className="serial font-bold text-leaf-dark underline" href={paths.serviceCase(c.code)}>{c.code}</Link> },
                  serial: { value: c.item, display: <span>{c.itemKind === "pair" ? "Pair " : "Speaker "}<SerialLink identity={c.item} bold={false} /></span> },
                  model: { value: c.model ?? "" },
                  received: { value: c.receivedOn, display: formatCalendarDay(c.receivedOn) },
                  age: {
                    value: c.age,
                    display: (
                      <span data-testid={c.stale ? "stale-case" : undefined}>
                        {plural(c.age, "day")} {c.stale ? <Badge tone="caution">Over {plural(staleDays, "day")}</Badge> : null}
                      </span>
                    ),
                  },
                  symptom: { value: c.symptom, display: c.symptom.length > 80 ? `${c.symptom.slice(0, 80)}…` : c.symptom },
                },
              }))}
            />
          </Panel>
        );
      })}
    </div>
  );
}
