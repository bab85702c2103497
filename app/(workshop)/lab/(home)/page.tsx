import type { Metadata } from "next";
import Link from "next/link";
import { AreaOverview } from "@/components/shell/area-overview";
import { ModelTable } from "@/components/workshop/reference-tables";
import { SerialLink } from "@/components/register/serial-link";
import { buttonClasses } from "@/components/ui/button";
import { DataTable } from "@/components/ui/data-table";
import { Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { listModels } from "@/lib/workshop/queries";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { formatCalendarDay, formatDay } from "@/lib/format";
import { failedParts } from "@/lib/lab/queries";
import { formatDb, formatLimitDb } from "@/lib/acoustics";
import { UNIT_CLASS_WORDS, UNIT_CLASSES } from "@/lib/lab/unit-counts";
import { listBatches, matchReadinessOf, openSets } from "@/lib/lab/units";
import { partWord, PART_TYPE_LABEL, isPartType } from "@/lib/vocabulary/part-types";

export const metadata: Metadata = { title: "Lab" };

const batchLink = (code: string) => (
  <Link className="serial whitespace-nowrap font-bold text-leaf-dark underline" href={`/lab/batches/${encodeURIComponent(code)}`}>
    {code}
  </Link>
);

export default async function Page() {
  await requirePage("lab.work");
  const db = getDb();
  const [models, batches, sets, failedItems] = await Promise.all([listModels(db), listBatches(db), openSets(db), failedParts(db)]);
  const waiting = batches.filter((b) => b.waiting > 0);
  // Matching is offered only where it can pair something; elsewhere the page says why not.
  const candidates = batches.filter((b) => b.free >= 2);
  const readiness = await matchReadinessOf(db, candidates);
  const ready = candidates.map((b) => ({ batch: b, readiness: readiness.get(b.id)! }));
  // The "Other" column only when some unit is neither waiting, free, reserved, fitted nor failed.
  const classes = UNIT_CLASSES.filter((c) => c !== "other" || batches.some((b) => b.other > 0));
  return (
    <AreaOverview area={areaByKey("lab")}>
      <div className="flex flex-wrap gap-3">
        <Link href="/lab/batches/new" className={buttonClasses("primary")} data-testid="register-batch">
          Register a batch
        </Link>
        <Link href="/lab/match" className={buttonClasses("secondary")}>
          Match left and right
        </Link>
        <Link href="/lab/crossovers" className={buttonClasses("secondary")}>
          Crossover boards
        </Link>
        <Link href="/lab/final-test" className={buttonClasses("secondary")} data-testid="final-test-link">
          Final pair test
        </Link>
      </div>
      <div className="grid gap-6 lg:grid-cols-2">
        <Panel title="Waiting for measurement">
          {waiting.length ? (
            <ul className="flex flex-col gap-1" data-testid="lab-waiting">
              {waiting.map((b) => (
                <li key={b.id}>
                  {batchLink(b.code)}: {b.waiting} of {b.units} {partWord(b.partType)}s ({b.partNumber})
                </li>
              ))}
            </ul>
          ) : (
            <p className="text-ink-soft">Every registered unit is measured.</p>
          )}
        </Panel>
        <Panel title="Ready to match">
          {ready.length ? (
            <ul className="flex flex-col gap-1" data-testid="lab-ready">
              {ready.map(({ batch: b, readiness: r }) => (
                <li key={b.id}>
                  {batchLink(b.code)}: {b.free} measured {partWord(b.partType)}s free{" "}
                  {r.quarantined ? <span className="text-danger" data-testid="lab-held-count">({r.quarantined} of them held by a containment and left out of matching){" "}</span> : null}
                  {r.canMatch ? (
                    <Link className="font-bold text-leaf-dark underline" href={`/lab/match?batch=${encodeURIComponent(b.code)}`}>
                      match them
                    </Link>
                  ) : (
                    <span className="text-ink-soft">— {r.why ?? "none can be paired yet."}</span>
                  )}
                </li>
              ))}
            </ul>
          ) : (
            <p className="text-ink-soft">No batch has two measured units free.</p>
          )}
        </Panel>
      </div>
      <Panel title="Reserved sets waiting for assembly">
        <DataTable
          caption="Matched sets reserved and not yet fitted"
          testId="lab-sets"
          empty="No set is waiting."
          initialSort={{ key: "made", dir: "desc" }}
          columns={[
            { key: "code", label: "Set" },
            { key: "part", label: "Part" },
            { key: "model", label: "For" },
            { key: "L", label: "Left" },
            { key: "R", label: "Right" },
            { key: "max", label: "Largest difference", numeric: true },
            { key: "made", label: "Reserved" },
          ]}
          rows={sets.map((s) => ({
            id: s.code,
            cells: {
              code: { value: s.code, display: <span className="serial">{s.code}</span> },
              part: { value: s.partType ?? "crossover", display: s.partType && isPartType(s.partType) ? PART_TYPE_LABEL[s.partType] : "Crossover" },
              model: { value: s.model ?? "" },
              L: { value: s.L ?? "", display: s.L ? <SerialLink identity={s.L} bold={false} /> : "" },
              R: { value: s.R ?? "", display: s.R ? <SerialLink identity={s.R} bold={false} /> : "" },
              max: { value: s.maxDiffDb, display: `${formatDb(s.maxDiffDb)} (limit ${formatLimitDb(s.limitDb)})` },
              made: { value: s.createdAt.getTime(), display: formatDay(s.createdAt) },
            },
          }))}
        />
      </Panel>
      <Panel title="Failures">
        {failedItems.length ? (
          <ul className="flex flex-col gap-1" data-testid="lab-failures">
            {failedItems.map((f) => (
              <li key={f.id}>
                <SerialLink identity={f.identity} /> {f.partType ?? f.kind.replace("_", " ")}: {f.reason ?? "failed"}
                {f.at ? <span className="text-sm text-ink-soft"> ({formatDay(f.at)})</span> : null}
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-ink-soft">No failed unit or board.</p>
        )}
      </Panel>
      <Panel title="Batches">
        <p className="mb-3 text-sm text-ink-soft">
          Each batch&apos;s units, counted by where they stand now: {classes.map((c) => UNIT_CLASS_WORDS[c].sentence).join(", ")}. The counts add up to the units.
        </p>
        <DataTable
          caption="Batches of drive units"
          testId="lab-batches"
          empty="No batch registered yet."
          initialSort={{ key: "code", dir: "desc" }}
          columns={[
            { key: "code", label: "Batch" },
            { key: "units", label: "Units", numeric: true },
            ...classes.map((c) => ({ key: c, label: UNIT_CLASS_WORDS[c].column, numeric: true })),
          ]}
          rows={batches.map((b) => ({
            id: b.id,
            cells: {
              // Sorted by when it came in; what and when sit under the code, to leave room for the counts.
              code: {
                value: `${b.receivedOn} ${b.code}`,
                display: (
                  <span className="text-sm">
                    {batchLink(b.code)}
                    <span className="block">
                      <span className="font-bold">{PART_TYPE_LABEL[b.partType]}</span> <span className="whitespace-nowrap">{b.partNumber}</span>
                    </span>
                    <span className="block whitespace-nowrap text-ink-soft">
                      lot {b.lot} · {formatCalendarDay(b.receivedOn)}
                    </span>
                  </span>
                ),
              },
              units: { value: b.units },
              ...Object.fromEntries(classes.map((c) => [c, { value: b[c] }])),
            },
          }))}
        />
      </Panel>
      <Panel title="Matching limits per model">
        <ModelTable models={models} show="tolerances" />
      </Panel>
    </AreaOverview>
  );
}
