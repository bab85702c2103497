import { Fragment } from "react";
import { SerialLink } from "@/components/register/serial-link";
import { SerialText } from "@/components/register/serial-text";
import { DataTable } from "@/components/ui/data-table";
import { describeEvent, subjectLabel, subjectWords } from "@/lib/events/describe";
import type { EventRow } from "@/lib/events/queries";
import { formatWhen, timeZoneName } from "@/lib/format";
import { stationName } from "@/lib/vocabulary/stations";

function About({ e }: { e: EventRow }) {
  const w = subjectWords(e);
  return (
    <span className="text-sm">
      {w.kind}{" "}
      {w.serial ? <SerialLink identity={w.serial} bold={false} /> : w.name ? <Fragment>{w.name}</Fragment> : <span className="text-ink-soft">(no longer in the register)</span>}
    </span>
  );
}

/** The event log as a sortable table: when, who, where, what and why. */
export function EventTable({ events, caption, empty = "No events recorded here yet." }: { events: EventRow[]; caption: string; empty?: string }) {
  return (
    <DataTable
      caption={caption}
      empty={empty}
      testId="event-table"
      initialSort={{ key: "at", dir: "desc" }}
      columns={[
        { key: "at", label: `When (${timeZoneName()})` },
        { key: "who", label: "Who", cellClassName: "min-w-32" },
        { key: "station", label: "Where", cellClassName: "min-w-28" },
        { key: "what", label: "What", cellClassName: "min-w-64" },
        { key: "about", label: "About", cellClassName: "min-w-44" },
        { key: "why", label: "Why", cellClassName: "min-w-40" },
      ]}
      rows={events.map((e) => {
        const what = `${describeEvent(e.type, e.data, { dealerNames: e.dealerNames })}${e.correctsId ? ` (a correction of an earlier record)` : ""}`;
        return {
          id: String(e.id),
          cells: {
            at: { value: e.at.getTime(), display: <time className="whitespace-nowrap" dateTime={e.at.toISOString()}>{formatWhen(e.at)}</time> },
            who: { value: e.actorName ?? (typeof e.data.machineTokenName === "string" ? `${e.data.machineTokenName} (machine token)` : "Twinleaf") },
            station: { value: stationName(e.station) },
            what: { value: what, display: <SerialText text={what} /> },
            about: { value: subjectLabel(e), display: <About e={e} /> },
            why: { value: e.reason ?? "" },
          },
        };
      })}
    />
  );
}
