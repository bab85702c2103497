/** The cabinet shop's home: every pair still on the route, and which are ready, holding or overdue. */
import "server-only";
import { ROUTE_STATIONS, type RouteStation } from "@/lib/vocabulary/stations";
import { and, eq, inArray, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { finishes, items } from "@/db/schema";
import { now as clockNow } from "@/lib/clock";
import type { Side } from "./types";
import { pairRoute, type PairRoute } from "./pair-route";
import { holdsOf } from "./rules";

export interface ShopPair {
  pair: string;
  model: string;
  finish: string | null;
  next: { seq: number; name: string; station: RouteStation } | null;
  sides: Side[];
  holdUntil: Date | null;
  holdLabel: string | null;
  openNcs: string[];
  /** Since when the next step has been allowed (the last step's time or the hold's release). */
  readySince: Date | null;
  unpartnered: boolean;
  /** A lacquer cabinet on the route by itself (no pair yet). */
  lone: boolean;
  /** A metal trim part on its model's trim route. */
  trim: boolean;
}

/** A pair whose next step has been allowed this long without being done is overdue (the demo workshop's rule). */
export const OVERDUE_AFTER_MS = 48 * 3600_000;

// "+": the few items in these states are read through items_kind_state_idx and then sorted; ordering
// by the bare column lets the planner walk every item of the kind in creation order instead.
const byCreation = sql`+${items.createdAt}`;

/** Every pair still on the cabinet route (and every lone lacquer cabinet and trim part on its route), where it is now. */
export async function shopPairs(db: DbOrTx, at: Date = clockNow()): Promise<ShopPair[]> {
  const pairs = await db.select().from(items).where(and(eq(items.kind, "pair"), inArray(items.state, ["in_production", "unpartnered"]))).orderBy(byCreation);
  // Lacquer cabinets in no pair, still on the route.
  const lone = await db
    .select({ item: items })
    .from(items)
    .innerJoin(finishes, eq(finishes.id, items.finishId))
    .where(and(eq(items.kind, "cabinet"), eq(finishes.kind, "lacquer"), inArray(items.state, ["in_progress", "in_route"]), sql`NOT EXISTS (SELECT 1 FROM links l WHERE l.child_id = ${items.id} AND l.ended_at IS NULL)`))
    .orderBy(byCreation);
  pairs.push(...lone.map((l) => l.item));
  // Trim parts received or on their route: the same engine, the same board.
  const trim = await db.select().from(items).where(and(eq(items.kind, "trim_part"), inArray(items.state, ["received", "in_route"]))).orderBy(byCreation);
  pairs.push(...trim);
  const out: ShopPair[] = [];
  for (const pair of pairs) {
    // Lacquer pairs are paired at assembly from cabinets that already finished: no route for them here.
    if (pair.attrs.pairedAt === "assembly") continue;
    let route: PairRoute;
    try {
      route = await pairRoute(db, pair, at);
    } catch {
      continue;
    }
    if (route.position.finished || !route.cabinets.length) continue;
    // The pair's next step: the earliest next step of its cabinets (a cabinet ahead waits for the other).
    const withNext = route.position.cabinets.filter((c) => c.next);
    const first = withNext.sort((a, b) => a.next!.seq - b.next!.seq)[0]!;
    const sides = withNext.filter((c) => c.next!.seq === first.next!.seq).map((c) => c.side);
    const holdUntil = withNext.filter((c) => sides.includes(c.side)).map((c) => c.holdUntil).filter((d): d is Date => d !== null).sort((a, b) => b.getTime() - a.getTime())[0] ?? null;
    const lastRecord = route.records.at(-1);
    const lastHold = route.position.cabinets.map((c) => c.holdUntil).filter(Boolean) as Date[];
    // Allowed since the later of the last record and the end of a hold that has run out.
    const released = holdsOf(route.spec.steps, route.history, sides).map((h) => h.until.getTime());
    const recordedSince = (lastRecord?.recordedAt ?? pair.createdAt).getTime();
    const readySince = holdUntil || lastHold.length ? null : new Date(Math.max(recordedSince, ...released));
    out.push({
      pair: pair.identity,
      model: route.model.code,
      finish: route.finishName,
      next: { seq: first.next!.seq, name: first.next!.name, station: first.next!.station },
      sides,
      holdUntil,
      holdLabel: withNext.find((c) => c.holdUntil)?.holdLabel ?? null,
      openNcs: route.position.openNcs,
      readySince,
      unpartnered: pair.kind === "pair" && route.cabinets.length < 2,
      lone: pair.kind === "cabinet",
      trim: pair.kind === "trim_part",
    });
  }
  return out;
}


/** Whether a pair may do its next step now: it has one, nothing holds it, and no hold is running. */
export const isReady = (p: ShopPair, at: Date) => Boolean(p.next) && !p.openNcs.length && (!p.holdUntil || p.holdUntil <= at);

export interface ShopBoard {
  /** Holds that end later today (before `dayEnd`), soonest first. */
  releasingToday: ShopPair[];
  /** Ready pairs whose next step has waited longer than OVERDUE_AFTER_MS. */
  overdue: ShopPair[];
  /** Per station of the route, in route order, the pairs ready there and those waiting there. */
  stations: { station: RouteStation; ready: ShopPair[]; waiting: ShopPair[] }[];
}

/**
 * Sorts the shop's pairs into what its home shows. Pure: `at` and `dayEnd`, the last moment of the
 * workshop's day in its own time zone (`workshopDayEnd` in lib/workshop-time.ts), are given.
 */
export function shopBoard(pairs: ShopPair[], at: Date, dayEnd: Date): ShopBoard {
  const releasingToday = pairs
    .filter((p) => p.holdUntil && p.holdUntil > at && p.holdUntil <= dayEnd && !p.openNcs.length)
    .sort((a, b) => a.holdUntil!.getTime() - b.holdUntil!.getTime());
  const overdue = pairs.filter((p) => isReady(p, at) && p.readySince && at.getTime() - p.readySince.getTime() > OVERDUE_AFTER_MS);
  const stations = ROUTE_STATIONS.filter((s) => pairs.some((p) => p.next?.station === s)).map((station) => {
    const here = pairs.filter((p) => p.next?.station === station);
    return { station, ready: here.filter((p) => isReady(p, at)), waiting: here.filter((p) => !isReady(p, at)) };
  });
  return { releasingToday, overdue, stations };
}
