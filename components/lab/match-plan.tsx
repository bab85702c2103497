import type { ReactNode } from "react";
import { DataTable } from "@/components/ui/data-table";
import { Notice } from "@/components/ui/notice";
import { bandLabel, formatDb, formatLimitDb } from "@/lib/acoustics/format";
import { whyNoPairs } from "@/lib/lab/plan-words";
import type { planPairs } from "@/lib/matching";
import { PairChart } from "./pair-chart-lazy";

const db2 = (n: number) => n.toFixed(2);

export interface MatchPlanProps {
  plan: ReturnType<typeof planPairs>;
  /** The units (drive units or boards) the plan was made from, by plan id (their serial). */
  units: { id: string; identity: string; levels: number[]; points: number[][] }[];
  notReady: { identity: string; reason: string }[];
  bands: { centreHz: number; nominal: string }[];
  limitDb: number;
  minHz: number;
  maxHz: number;
  /** "Units measured and free", "Boards ready and free". */
  freeLabel: string;
  /** "units" or "boards", for the words around the plan. */
  noun: string;
  /** Test ids: "plan-summary" etc., with this prefix. */
  testPrefix?: string;
  /** The accept form, shown under the plan. */
  accept?: ReactNode;
}

/**
 * An optimal left/right plan as the lab reads it: the figures against greedy pairing, the pairs
 * with their cost and largest difference, the units left over (not paired) and why, and each
 * pair's two responses overlaid with the band both must stay in (the mean of their band levels ±
 * half the limit). When nothing can pair, it says why instead of offering a plan to accept.
 */
export function MatchPlan({ plan, units, notReady, bands, limitDb, minHz, maxHz, freeLabel, noun, testPrefix = "", accept }: MatchPlanProps) {
  const byId = new Map(units.map((u) => [u.id, u]));
  const extra = plan.pairs.length - plan.greedyPairs;
  const serial = (id: string) => byId.get(id)?.identity ?? id;
  const pts = (id: string) => (byId.get(id)?.points ?? []).map((x) => [x[0]!, x[1]!] as [number, number]);
  const labels = bands.map((b) => bandLabel(b.nominal));
  const nothing = whyNoPairs(plan, { free: units.length, limitDb, noun, bandLabels: labels });
  const leftOver = [...plan.single.map((s) => ({ identity: serial(s.id), reason: s.reason })), ...notReady];
  return (
    <div className="flex flex-col gap-4">
      <div className="grid gap-3 sm:grid-cols-4" data-testid={`${testPrefix}plan-summary`}>
        <Figure label={freeLabel} value={String(units.length)} />
        <Figure label="Pairs" value={String(plan.pairs.length)} note={`greedy pairing: ${plan.greedyPairs}`} />
        <Figure label="Total cost" value={`${db2(plan.totalCost)} dB RMS`} note={`greedy: ${db2(plan.greedyTotalCost)} dB RMS`} />
        <Figure label="Gain over greedy" value={extra > 0 ? `+${extra} pair${extra === 1 ? "" : "s"}` : `${db2(plan.greedyTotalCost - plan.totalCost)} dB RMS`} />
      </div>
      {nothing ? (
        <Notice tone="caution" testId={`${testPrefix}plan-nothing`}>
          {nothing} Nothing can be reserved until {units.length >= 2 ? `closer ${noun} are measured` : `more ${noun} are measured`}.
        </Notice>
      ) : null}
      <DataTable
        caption="Pairs of the plan"
        testId={`${testPrefix}plan-pairs`}
        empty="No pair in this plan."
        initialSort={{ key: "cost", dir: "asc" }}
        columns={[
          { key: "n", label: "#", numeric: true },
          { key: "a", label: "Left" },
          { key: "b", label: "Right" },
          { key: "cost", label: "Cost", numeric: true },
          { key: "max", label: `Largest difference (limit ${formatLimitDb(limitDb)})`, numeric: true },
        ]}
        rows={plan.pairs.map((p, i) => ({
          id: `${p.a}:${p.b}`,
          cells: {
            n: { value: i + 1 },
            a: { value: serial(p.a), display: <span className="serial whitespace-nowrap">{serial(p.a)}</span> },
            b: { value: serial(p.b), display: <span className="serial whitespace-nowrap">{serial(p.b)}</span> },
            cost: { value: p.cost, display: <span className="whitespace-nowrap">{db2(p.cost)} dB RMS</span> },
            max: { value: p.maxDiffDb, display: <span className="whitespace-nowrap">{`${formatDb(p.maxDiffDb)} at ${labels[p.worstBand] ?? "?"}`}</span> },
          },
        }))}
      />
      {leftOver.length ? (
        <div data-testid={`${testPrefix}plan-single`}>
          <h3 className="mb-1 font-bold">Left over, not paired ({leftOver.length})</h3>
          <p className="mb-1 text-sm text-ink-soft">Each stays free for a later plan; the reason it got no partner this time is beside it.</p>
          <ul className="list-disc pl-5">
            {leftOver.map((s) => (
              <li key={s.identity}>
                <span className="serial">{s.identity}</span>: {s.reason}
              </li>
            ))}
          </ul>
        </div>
      ) : null}
      {accept}
      {plan.pairs.length ? (
        <>
          <h3 className="mt-2 font-bold">Each pair&apos;s responses</h3>
          <div className="grid gap-4 lg:grid-cols-2">
            {plan.pairs.map((p, i) => {
              const A = byId.get(p.a)!;
              const B = byId.get(p.b)!;
              const allowed = bands.map((band, k) => {
                const mean = (A.levels[k]! + B.levels[k]!) / 2;
                return { centreHz: band.centreHz, nominal: band.nominal, low: mean - limitDb / 2, high: mean + limitDb / 2 };
              });
              return (
                <PairChart
                  key={`${p.a}:${p.b}`}
                  title={`Pair ${i + 1}: ${db2(p.cost)} dB RMS, largest difference ${formatDb(p.maxDiffDb)} at ${labels[p.worstBand] ?? "?"}`}
                  a={{ label: A.identity, points: pts(p.a) }}
                  b={{ label: B.identity, points: pts(p.b) }}
                  bands={allowed}
                  limitDb={limitDb}
                  minHz={minHz}
                  maxHz={maxHz}
                />
              );
            })}
          </div>
        </>
      ) : null}
    </div>
  );
}

function Figure({ label, value, note }: { label: string; value: string; note?: string }) {
  return (
    <div className="rounded-lg border border-line bg-paper p-3">
      <p className="text-sm text-ink-soft">{label}</p>
      <p className="text-2xl font-bold tabular-nums">{value}</p>
      {note ? <p className="text-sm text-ink-soft">{note}</p> : null}
    </div>
  );
}
