import type { Metadata } from "next";
import { desc, isNotNull } from "drizzle-orm";
import { AreaOverview } from "@/components/shell/area-overview";
import { SerialLink } from "@/components/register/serial-link";
import { DataTable } from "@/components/ui/data-table";
import { Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { nonconformances } from "@/db/schema";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { formatWhen } from "@/lib/format";
import { itemById } from "@/lib/genealogy/graph";
import { openNonconformances, pairRoute } from "@/lib/route/server";
import { DispositionForm } from "./disposition-form";

export const metadata: Metadata = { title: "Quality" };

const DISPOSITION: Record<string, string> = { rework: "rework", use_as_is: "use as is", scrap: "scrap" };

export default async function Page() {
  await requirePage("quality.work");
  const db = getDb();
  const open = await openNonconformances(db);
  const forms = await Promise.all(
    open.map(async ({ nc, pair }) => {
      const item = await itemById(db, nc.pairId);
      const route = item ? await pairRoute(db, item) : null;
      return { nc, pair, steps: route?.spec.steps.filter((s) => s.seq <= nc.seq).map((s) => ({ seq: s.seq, name: s.name })) ?? [], sides: route?.cabinets.map((c) => ({ side: c.side, identity: c.item.identity })) ?? [] };
    }),
  );
  const closed = await db.select().from(nonconformances).where(isNotNull(nonconformances.disposition)).orderBy(desc(nonconformances.dispositionedAt)).limit(50);
  return (
    <AreaOverview area={areaByKey("quality")}>
      <Panel title="Open nonconformances">
        {forms.length ? (
          <div className="flex flex-col gap-6" data-testid="open-ncs">
            {forms.map(({ nc, pair, steps, sides }) => (
              <div key={nc.id}>
                <p className="mb-2">
                  <span className="font-bold">{nc.code}</span> on <SerialLink identity={pair} href={`/pairs/${encodeURIComponent(pair)}`} />, opened {formatWhen(nc.openedAt)} at step {nc.seq}: {nc.finding}
                </p>
                <DispositionForm nc={{ id: nc.id, code: nc.code, seq: nc.seq }} steps={steps} sides={sides} back="/containment" />
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
