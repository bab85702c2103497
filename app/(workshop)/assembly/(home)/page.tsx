import type { Metadata } from "next";
import { AreaOverview } from "@/components/shell/area-overview";
import { HeldMark } from "@/components/register/containment-hold";
import { SerialLink } from "@/components/register/serial-link";
import { ModelTable } from "@/components/workshop/reference-tables";
import { Badge } from "@/components/ui/badge";
import { DataTable } from "@/components/ui/data-table";
import { Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { pairsAwaitingAssembly, reservedSets, unpairedLacquerCabinets } from "@/lib/assembly";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { formatWhen } from "@/lib/format";
import { listModels } from "@/lib/workshop/queries";
import { LacquerPairForm } from "../lacquer-form";
import { ScanForm } from "../scan-form";

export const metadata: Metadata = { title: "Assembly" };

const PART_TYPE_NAME: Record<string, string> = { tweeter: "Tweeters", midrange: "Midrange units", bass: "Bass units", crossover: "Crossover boards" };
const pairPage = (identity: string) => `/assembly/${encodeURIComponent(identity)}`;

export default async function Page() {
  await requirePage("assembly.work");
  const db = getDb();
  const [models, waiting, lacquer, sets] = await Promise.all([listModels(db), pairsAwaitingAssembly(db), unpairedLacquerCabinets(db), reservedSets(db)]);
  return (
    <AreaOverview area={areaByKey("assembly")}>
      <ScanForm />

      <Panel title="Pairs waiting for assembly">
        <DataTable
          caption="Pairs whose cabinets have finished their route"
          testId="assembly-waiting"
          empty="No pair has finished its route and waits for assembly."
          initialSort={{ key: "since", dir: "asc" }}
          columns={[
            { key: "pair", label: "Pair" },
            { key: "model", label: "Model" },
            { key: "finish", label: "Finish" },
            { key: "cabinets", label: "Cabinets" },
            { key: "since", label: "Ready since" },
          ]}
          rows={waiting.map((p) => ({
            id: p.identity,
            cells: {
              pair: {
                value: p.identity,
                display: (
                  <span className="flex flex-wrap items-center gap-2">
                    <SerialLink identity={p.identity} href={pairPage(p.identity)} />
                    {p.openNcs.length ? <Badge tone="danger">on hold: {p.openNcs.join(", ")}</Badge> : null}
                    {p.heldBy.map((code) => (
                      <HeldMark key={code} code={code} />
                    ))}
                  </span>
                ),
              },
              model: { value: p.model },
              finish: { value: p.finish ?? "", display: `${p.finish ?? "—"}${p.lacquer ? " (lacquer)" : ""}` },
              cabinets: { value: p.cabinets.join(" "), display: <span className="serial text-sm">{p.cabinets.join(", ")}</span> },
              since: { value: p.readySince.getTime(), display: formatWhen(p.readySince) },
            },
          }))}
        />
      </Panel>

      <Panel title="Lacquer cabinets waiting for a partner">
        <p className="mb-4 text-ink-soft">
          Lacquer cabinets are made in batches without a pair. Pair two finished cabinets of one model and colour here; veneered cabinets are paired at the flitch.
        </p>
        {lacquer.length ? (
          <div className="mb-6 grid gap-4 md:grid-cols-2 xl:grid-cols-3" data-testid="lacquer-groups">
            {lacquer.map((g) => (
              <section key={`${g.modelId}-${g.finishId}`} className="rounded-lg border border-line bg-paper p-3">
                <h3 className="mb-2 font-bold">
                  {g.model} {g.modelName} · {g.colour} <span className="text-sm font-normal text-ink-soft">({g.cabinets.length})</span>
                </h3>
                <ul className="flex flex-wrap gap-x-3 gap-y-1 text-sm">
                  {g.cabinets.map((c) => (
                    <li key={c}>
                      <SerialLink identity={c} bold={false} />
                    </li>
                  ))}
                </ul>
              </section>
            ))}
          </div>
        ) : (
          <p className="mb-6 text-ink-soft" data-testid="lacquer-groups-empty">No finished lacquer cabinet waits for a partner.</p>
        )}
        <LacquerPairForm cabinets={lacquer.flatMap((g) => g.cabinets)} />
      </Panel>

      <Panel title="Matched sets reserved by the lab">
        {sets.length ? (
          <div className="grid gap-4 md:grid-cols-2 xl:grid-cols-4" data-testid="assembly-sets">
            {sets.map((g) => (
              <section key={g.partType}>
                <h3 className="mb-1 font-bold">
                  {PART_TYPE_NAME[g.partType] ?? g.partType} <span className="text-sm font-normal text-ink-soft">({g.sets.length} {g.sets.length === 1 ? "set" : "sets"})</span>
                </h3>
                <ul className="flex flex-col gap-1 text-sm">
                  {g.sets.slice(0, 15).map((s) => (
                    <li key={s.code}>
                      <span className="serial font-bold">{s.code}</span>
                      {s.model ? ` (${s.model})` : ""}: {s.left ? <SerialLink identity={s.left} bold={false} /> : "—"} and {s.right ? <SerialLink identity={s.right} bold={false} /> : "—"}
                    </li>
                  ))}
                  {g.sets.length > 15 ? <li className="text-ink-soft">and {g.sets.length - 15} more</li> : null}
                </ul>
              </section>
            ))}
          </div>
        ) : (
          <p className="text-ink-soft">No set is reserved: the lab matches drive units and crossover boards in sets before assembly.</p>
        )}
      </Panel>

      <Panel title="Models and their drive-unit positions">
        <ModelTable models={models} />
      </Panel>
    </AreaOverview>
  );
}
