import { DataTable } from "@/components/ui/data-table";
import { describeEvent } from "@/lib/events/describe";
import type { EventRow } from "@/lib/events/queries";

const when = new Intl.DateTimeFormat("en-GB", { dateStyle: "medium", timeStyle: "short", timeZone: process.env.TZ || "UTC" });

/** The event log as a sortable table: when, who, where, what and why. */
export function EventTable({ events, caption, empty = "No events recorded here yet." }: { events: EventRow[]; caption: string; empty?: string }) {
  return (
    <DataTable
      caption={caption}
      empty={empty}
      testId="event-table"
      initialSort={{ key: "at", dir: "desc" }}
      columns={[
        { key: "at", label: "When" },
        { key: "who", label: "Who" },
        { key: "station", label: "Where" },
        { key: "what", label: "What" },
        { key: "about", label: "About" },
        { key: "why", label: "Why" },
      ]}
      rows={events.map((e) => ({
        id: String(e.id),
        cells: {
          at: { value: e.at.getTime(), display: <time dateTime={e.at.toISOString()}>{when.format(e.at)}</time> },
          who: { value: e.actorName ?? "Twinleaf" },
          station: { value: e.station },
          what: { value: describeEvent(e.type), display: <span title={e.type}>{describeEvent(e.type)}{e.correctsId ? ` (corrects #${e.correctsId})` : ""}</span> },
          about: { value: `${e.subjectKind} ${e.subjectId}`, display: <span className="serial text-sm">{e.subjectKind} {e.subjectId}</span> },
          why: { value: e.reason ?? "" },
        },
      }))}
    />
  );
}
