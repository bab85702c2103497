import { paths } from "@/lib/paths";
import type { Metadata } from "next";
import Link from "next/link";
import { AreaOverview } from "@/components/shell/area-overview";
import { FinishTable, ModelTable } from "@/components/workshop/reference-tables";
import { SerialLink } from "@/components/register/serial-link";
import { buttonClasses } from "@/components/ui/button";
import { DataTable } from "@/components/ui/data-table";
import { Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { listFinishes, listModels } from "@/lib/workshop/queries";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { listFlitches } from "@/lib/veneer/flitches";
import { formatCalendarDay } from "@/lib/format";

export const metadata: Metadata = { title: "Veneer room" };

/** Flitches shown before "show all": the newest, which are the ones still being cut from. */
const RECENT = 12;

export default async function Page({ searchParams }: { searchParams: Promise<{ all?: string }> }) {
  await requirePage("veneer.work");
  const db = getDb();
  const showAll = (await searchParams).all === "1";
  const [models, finishes, allFlitches] = await Promise.all([listModels(db), listFinishes(db), listFlitches(db)]);
  const flitchRows = showAll ? allFlitches : allFlitches.slice(0, RECENT);
  return (
    <AreaOverview area={areaByKey("veneer")}>
      <Panel
        title="Flitches"
        actions={
          <div className="flex flex-wrap gap-2">
            <Link href={paths.veneerReceive} className={buttonClasses("primary")} data-testid="receive-flitch">
              Receive a flitch
            </Link>
            <Link href={paths.lacquer} className={buttonClasses("secondary")}>
              Lacquer cabinets
            </Link>
          </div>
        }
      >
        <DataTable
          caption="Flitches received, newest first"
          testId="flitch-table"
          empty="No flitch received yet."
          initialSort={{ key: "received", dir: "desc" }}
          columns={[
            { key: "identity", label: "Flitch" },
            { key: "species", label: "Species" },
            { key: "supplier", label: "Supplier" },
            { key: "log", label: "Log / bundle" },
            { key: "received", label: "Received" },
            { key: "leaves", label: "Leaves", numeric: true },
            { key: "measured", label: "Measured", numeric: true },
            { key: "free", label: "Free", numeric: true },
            { key: "pairs", label: "Pairs", numeric: true },
          ]}
          rows={flitchRows.map((f) => ({
            id: f.id,
            cells: {
              identity: { value: f.identity, display: <SerialLink identity={f.identity} href={paths.flitch(f.identity)} /> },
              species: { value: f.species },
              supplier: { value: f.supplier },
              log: { value: f.logReference, display: <span className="whitespace-nowrap">{f.logReference}</span> },
              received: { value: f.receivedOn, display: <span className="whitespace-nowrap">{formatCalendarDay(f.receivedOn)}</span> },
              leaves: { value: f.leafCount },
              measured: { value: f.measured },
              free: { value: f.free },
              pairs: { value: f.pairs },
            },
          }))}
        />
        {allFlitches.length > RECENT ? (
          <p className="mt-3">
            <Link className="font-bold text-leaf-dark underline" href={showAll ? paths.veneer : `${paths.veneer}?all=1`}>
              {showAll ? `Show the ${RECENT} newest only` : `Show all ${allFlitches.length} flitches`}
            </Link>
          </p>
        ) : null}
      </Panel>
      <Panel title="Leaves each model takes">
        <ModelTable models={models} show="veneer" />
      </Panel>
      <Panel title="Veneer species">
        <FinishTable finishes={finishes.filter((f) => f.kind === "veneer")} />
      </Panel>
    </AreaOverview>
  );
}
