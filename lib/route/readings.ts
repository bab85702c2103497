import "server-only";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { isRouteStation, ROUTE_STATIONS, STATION_NAME, type RouteStation } from "@/lib/vocabulary/stations";
import type { ReadingValue } from "./types";
import { readWindow } from "./window";

export interface StationReading {
  recordId: number;
  station: RouteStation;
  seq: number;
  step: string;
  startedAt: Date;
  recordedAt: Date;
  readings: Record<string, ReadingValue>;
  outOfWindow: boolean;
  pair: { id: string; identity: string; state: string };
  cabinets: { id: string; identity: string; side: "L" | "R"; state: string }[];
}

/**
 * Every route step recorded at `station` between `from` and `to` (both ends included; a day means
 * the whole workshop day), with the cabinets that did it and their pair: "every press cycle at the
 * forming press between these two dates". A step belongs to a station through the process spec it
 * was recorded under, so a later spec that moves a step does not rewrite the past. A corrected
 * record gives its newest correction's readings and start. Refuses an
 * unknown station, a date that is not a date, and a window that ends before it starts.
 */
export async function readingsAtStation(db: DbOrTx, input: { station: unknown; from: unknown; to: unknown }): Promise<StationReading[]> {
  const station = typeof input.station === "string" ? input.station.trim() : "";
  if (!isRouteStation(station)) {
    const known = ROUTE_STATIONS.map((s) => `${STATION_NAME[s]} (${s})`).join(", ");
    throw new AppError(400, `${station ? `"${station.slice(0, 40)}" is not` : "Name"} a station of the cabinet route. The stations are: ${known}.`, {
      station: ["Choose a station of the cabinet route."],
    });
  }
  const w = readWindow(input.from, input.to);
  if (!w.ok) throw new AppError(400, w.message, { [w.field]: [w.message] });
  const rows = await db.all<{
    id: number; seq: number; step: string; started_at: number; recorded_at: number; readings: string; out_of_window: number;
    pair_id: string; pair_identity: string; pair_state: string; cabinets: string;
  }>(sql`
    SELECT r.id, r.seq, json_extract(st.value, '$.name') AS step,
           -- A corrected record reads as its newest correction says (lib/route/corrections.ts).
           coalesce((SELECT c.started_at FROM route_corrections c WHERE c.record_id = r.id ORDER BY c.id DESC LIMIT 1), r.started_at) AS started_at,
           r.recorded_at,
           coalesce((SELECT c.readings FROM route_corrections c WHERE c.record_id = r.id ORDER BY c.id DESC LIMIT 1), r.readings) AS readings,
           coalesce((SELECT c.out_of_window FROM route_corrections c WHERE c.record_id = r.id ORDER BY c.id DESC LIMIT 1), r.out_of_window) AS out_of_window,
           p.id AS pair_id, p.identity AS pair_identity, p.state AS pair_state,
           (SELECT json_group_array(json_array(c.id, c.identity, json_extract(rc.value, '$.side'), c.state))
              FROM json_each(r.cabinets) rc JOIN items c ON c.id = json_extract(rc.value, '$.id')) AS cabinets
    FROM route_records r
    JOIN process_specs s ON s.id = r.spec_id
    JOIN json_each(s.steps) st ON json_extract(st.value, '$.seq') = r.seq
    JOIN items p ON p.id = r.pair_id
    WHERE json_extract(st.value, '$.station') = ${station}
      AND r.recorded_at BETWEEN ${w.from.getTime()} AND ${w.to.getTime()}
    ORDER BY r.recorded_at, r.id`);
  return rows.map((r) => ({
    recordId: Number(r.id),
    station,
    seq: Number(r.seq),
    step: r.step,
    startedAt: new Date(Number(r.started_at)),
    recordedAt: new Date(Number(r.recorded_at)),
    readings: JSON.parse(r.readings) as Record<string, ReadingValue>,
    outOfWindow: Boolean(r.out_of_window),
    pair: { id: r.pair_id, identity: r.pair_identity, state: r.pair_state },
    cabinets: (JSON.parse(r.cabinets) as [string, string, "L" | "R", string][])
      .map(([id, identity, side, state]) => ({ id, identity, side, state }))
      .sort((a, b) => a.side.localeCompare(b.side)),
  }));
}
