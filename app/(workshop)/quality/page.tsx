import { paths } from "@/lib/paths";
import type { Metadata } from "next";
import { AreaOverview } from "@/components/shell/area-overview";
import { SerialLink } from "@/components/register/serial-link";
import { DataTable } from "@/components/ui/data-table";
import { Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { formatWhen } from "@/lib/format";
import { dispositionedNonconformances, ncsToDisposition } from "@/lib/route/nonconformances";
import { DispositionForm } from "./disposition-form";

export const metadata: Metadata = { title: "Quality" };

const DISPOSITION: Record<string, string> = { rework: "rework", use_as_is: "use as is", scrap: "scrap" };

export default async function Page() {
  await requirePage("quality.work");
  const db = getDb();
  const [forms, closed] = await Promise.all([ncsToDisposition(db), dispositionedNonconformances(db)]);
  return (
    <AreaOverview area={areaByKey("quality")}>
      <Panel title="Open nonconformances">
        {forms.length ? (
          <div className="flex flex-col gap-6" data-testid="open-ncs">
            {forms.map(({ nc, pair, steps, sides }) => (
              <div key={nc.id}>
                <p className="mb-2">
                  <span className="font-bold">{nc.code}</span> on <SerialLink identity={pair} href={paths.cabinetPair(pair)} />, opened {formatWhen(nc.openedAt)} at step {nc.seq}: {nc.finding}
                </p>
                <DispositionForm nc={{ id: nc.id, code: nc.code, seq: nc.seq }} steps={steps} sides={sides} back={paths.quality} />
              </div>
            ))}
          </div>
        ) : (
          <p className="text-ink-soft">No nonconformance is open.</p>
        )}
      </Panel>
      <Panel title="Dispositioned">
        <DataTable
          caption="Nonconformances dispositioned, newest first"
          testId="closed-ncs"
          empty="None yet."
          initialSort={{ key: "at", dir: "desc" }}
          columns={[
            { key: "code", label: "Code" },
            { key: "finding", label: "Finding" },
            { key: "disposition", label: "Disposition" },
            { key: "reason", label: "Reason" },
            { key: "at", label: "When" },
          ]}
          rows={closed.map((n) => ({
            id: n.id,
            cells: {
              code: { value: n.code },
              finding: { value: n.finding },
              disposition: { value: n.disposition ?? "", display: `${DISPOSITION[n.disposition!]}${n.reworkToSeq ? ` to step ${n.reworkToSeq}` : ""}` },
              reason: { value: n.reason ?? "" },
              at: { value: n.dispositionedAt?.getTime() ?? 0, display: n.dispositionedAt ? formatWhen(n.dispositionedAt) : "" },
            },
          }))}
        />
      </Panel>
    </AreaOverview>
  );
}
