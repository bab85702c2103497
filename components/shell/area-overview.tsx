import type { ReactNode } from "react";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import type { Area } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { recentEvents } from "@/lib/events/queries";
import { EventTable } from "./event-table";
import { SafetyCautions } from "./safety-cautions";

/** An area's front page: what it does, its cautions, what it draws on, and what was last recorded there. */
export async function AreaOverview({ area, children }: { area: Area; children?: ReactNode }) {
  const viewer = await requirePage(area.permission);
  const events = area.stations.length ? await recentEvents(getDb(), { viewer, stations: area.stations, limit: 25 }) : [];
  return (
    <div className="flex flex-col gap-6" data-testid={`area-${area.key}`}>
      <PageHeader title={area.label} lead={area.summary} />
      <SafetyCautions cautions={area.cautions} />
      {children}
      {area.stations.length ? (
        <Panel title="Recently recorded here">
          <EventTable events={events} caption={`Events recorded in ${area.label}`} />
        </Panel>
      ) : null}
    </div>
  );
}
