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
import { formatDay } from "@/lib/format";
import { failedParts } from "@/lib/lab/queries";
import { formatDb, formatLimitDb } from "@/lib/acoustics";
import { listBatches, matchReadinessOf, openSets } from "@/lib/lab/units";
import { BatchCountsNote, BatchTable, batchLink } from "@/components/lab/batch-table";
import { paths } from "@/lib/paths";
import { partWord, PART_TYPE_LABEL, isPartType } from "@/lib/vocabulary/part-types";

export const metadata: Metadata = { title: "Lab" };

// The home lists the newest batches and failures; every batch is one link away (a workshop
// registers dozens a year, and failed units stay on record).
const HOME_BATCHES = 30;
const HOME_FAILURES = 25;

export default async function Page() {
  await requirePage("lab.work");
  const db = getDb();
  const [models, batches, sets, failures] = await Promise.all([listModels(db), listBatches(db), openSets(db), failedParts(db, HOME_FAILURES)]);
  const waiting = batches.filter((b) => b.waiting > 0);
  const newest = batches.slice(0, HOME_BATCHES);
  // Matching is offered only where it can pair something; elsewhere the page says why not.
  const candidates = batches.filter((b) => b.free >= 2);
  const readiness = await matchReadinessOf(db, candidates);
  const ready = candidates.map((b) => ({ batch: b, readiness: readiness.get(b.id)! }));
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
        {failures.parts.length ? (
          <ul className="flex flex-col gap-1" data-testid="lab-failures">
            {failures.parts.map((f) => (
              <li key={f.id}>
                <SerialLink identity={f.identity} /> {f.partType ?? f.kind.replace("_", " ")}: {f.reason ?? "failed"}
                {f.at ? <span className="text-sm text-ink-soft"> ({formatDay(f.at)})</span> : null}
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-ink-soft">No failed unit or board.</p>
        )}
        {failures.total > failures.parts.length ? (
          <p className="mt-2 text-sm text-ink-soft" data-testid="lab-failures-more">
            The {failures.parts.length} newest of {failures.total.toLocaleString("en")} units and boards that failed; each batch&apos;s page lists all of its units.
          </p>
        ) : null}
      </Panel>
      <Panel
        title="Batches"
        actions={
          <Link className="font-bold text-leaf-dark underline" href={paths.labBatches} data-testid="lab-every-batch-link">
            Every batch ({batches.length.toLocaleString("en")})
          </Link>
        }
      >
        <BatchCountsNote batches={newest} />
        <BatchTable batches={newest} />
        {batches.length > HOME_BATCHES ? (
          <p className="mt-2 text-sm text-ink-soft" data-testid="lab-batches-more">
            The {HOME_BATCHES} newest of {batches.length.toLocaleString("en")}.{" "}
            <Link className="font-bold text-leaf-dark underline" href={paths.labBatches}>
              Every batch
            </Link>
          </p>
        ) : null}
      </Panel>
      <Panel title="Matching limits per model">
        <ModelTable models={models} show="tolerances" />
      </Panel>
    </AreaOverview>
  );
}
