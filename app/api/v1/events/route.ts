import { z } from "zod";
import { wholeNumber } from "@/lib/input/numbers";
import { getDb } from "@/db";
import { guardedRoute } from "@/lib/auth/guard";
import { recentEvents } from "@/lib/events/queries";

const query = z.object({
  limit: wholeNumber(z.number({ error: "limit is a whole number from 1 to 500." }).int().min(1, "limit is at least 1.").max(500, "limit is at most 500."), { empty: 50 }),
  station: z.string().trim().min(1).max(40).optional(),
});

/** The newest events of the log, newest first. */
export const GET = guardedRoute("register.read", { query }, async ({ query }) => {
  const rows = await recentEvents(getDb(), { limit: query.limit, stations: query.station ? [query.station] : undefined });
  return { events: rows.map((e) => ({ ...e, at: e.at.toISOString() })) };
});
