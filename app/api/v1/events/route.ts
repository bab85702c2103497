import { z } from "zod";
import { wholeNumber } from "@/lib/input/numbers";
import { getDb } from "@/db";
import { guardedRoute } from "@/lib/auth/guard";
import { recentEvents } from "@/lib/events/queries";
import { AREA_STATIONS, ROUTE_STATIONS } from "@/lib/vocabulary/stations";

const STATIONS = [...ROUTE_STATIONS, ...AREA_STATIONS] as [string, ...string[]];

const query = z.object({
  limit: wholeNumber(z.number({ error: "limit is a whole number from 1 to 500." }).int().min(1, "limit is at least 1.").max(500, "limit is at most 500."), { empty: 50 }),
  station: z.enum(STATIONS, { error: `station is one of: ${STATIONS.join(", ")}.` }).optional(),
});

/**
 * The newest events of the log this person may see (lib/events/queries.ts `eventScope`: their
 * areas' stations and the register's items; the whole log only for an administrator), newest
 * first. Naming a station narrows the list; it never widens what may be seen.
 */
export const GET = guardedRoute("register.read", { query }, async ({ query, user }) => {
  const rows = await recentEvents(getDb(), { viewer: user, limit: query.limit, stations: query.station ? [query.station] : undefined });
  return { events: rows.map((e) => ({ ...e, at: e.at.toISOString() })) };
});
