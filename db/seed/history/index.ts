/**
 * Two invented years of production for the demo workshop, written through the register's own
 * write functions (the veneer room's, the route's, the lab's, assembly's, dispatch's, the
 * genealogy's), each called with the clock set to its invented moment (lib/clock.ts `atTime`), in
 * time order, one transaction per call. So the history obeys every rule the application does: the
 * pairs stand on real matched sets and their certificates print real match figures. Everything is
 * planned first from a seeded PRNG, so a given `now` and `seed` always give the same register.
 * Demo data only: no test of the computation may rely on it.
 */
import { sql } from "drizzle-orm";
import type { Db } from "@/db";
import { AppError } from "@/lib/auth/errors";
import { atTime } from "@/lib/clock";
import { planBuild, planCabinets, planFinalTest, planLacquerToday } from "./assembly";
import { planPairTrim, planTrimToday } from "./trim";
import { DAY, plus, Rng } from "./basics";
import { planCrossovers } from "./crossovers";
import { planPacking, planShipments } from "./dispatch";
import { MakerSerials, planLabToday, planUnitBatches } from "./lab";
import { Plan, type Ctx } from "./plan";
import { loadReference } from "./reference";
import { planCases } from "./cases";
import { planOwners, planRepair } from "./service";
import { planFlitches, planFreshFlitch } from "./veneer";
import { planWorld } from "./world";

export interface HistoryCounts {
  pairs: number;
  shippedPairs: number;
  /** Pairs not yet shipped: in production, built and awaiting their test, ready to pack, packed. */
  pairsInWorkshop: number;
  shipments: number;
  items: number;
  owners: number;
  ownerships: number;
}

const NONE: HistoryCounts = { pairs: 0, shippedPairs: 0, pairsInWorkshop: 0, shipments: 0, items: 0, owners: 0, ownerships: 0 };

export const DEFAULT_HISTORY_SEED = 0x7a11ea5;
/** Months of history by default: two years, enough for a tweeter to fail a year after shipping. */
export const DEFAULT_HISTORY_MONTHS = 24;

/** When the workshop's reference data (models, finishes, dealers, people) is dated: before the first flitch and lot of a history ending at `now`. */
export function referenceDate(now: Date, months = DEFAULT_HISTORY_MONTHS): Date {
  return plus(now, -(months * 30.4 + 60) * DAY);
}

type Tally = Record<"pairs" | "shipped" | "shipments" | "items" | "owners" | "ownerships", number>;

async function tally(db: Db): Promise<Tally> {
  const [row] = await db.all<Tally>(sql`
    SELECT (SELECT count(*) FROM items WHERE kind = 'pair') AS pairs,
           (SELECT count(*) FROM items WHERE kind = 'pair' AND state = 'shipped') AS shipped,
           (SELECT count(*) FROM items WHERE kind = 'shipment') AS shipments,
           (SELECT count(*) FROM items) AS items,
           (SELECT count(*) FROM owners) AS owners,
           (SELECT count(*) FROM ownerships) AS ownerships`);
  return Object.fromEntries(Object.entries(row!).map(([k, v]) => [k, Number(v)])) as Tally;
}

/**
 * The history is some five thousand short transactions, and with SQLite's `synchronous = FULL`
 * each commit waits for the disk (about 5 ms here, against 0.3 ms): seeding would take minutes.
 * In WAL mode `NORMAL` is still safe from corruption (SQLite's documentation, "PRAGMA
 * synchronous"); only the last commits could be lost to a power cut, and a half-written demo is
 * seeded again. The setting belongs to the connection the seed writes through (a busy-free pool
 * hands the same one back), and is put back afterwards. A server that refuses it is left as it is.
 */
async function quickCommits(db: Db): Promise<() => Promise<void>> {
  try {
    const [row] = await db.all<{ synchronous: number }>(sql`PRAGMA synchronous`);
    const was = Number(row?.synchronous);
    if (!Number.isInteger(was)) return async () => {};
    await db.run(sql`PRAGMA synchronous = NORMAL`);
    return async () => {
      await db.run(sql.raw(`PRAGMA synchronous = ${was}`));
    };
  } catch {
    return async () => {};
  }
}

/**
 * Seeds the invented production history ending at `now`. Skips entirely when the register already
 * holds a pair (a second run, or a workshop that has started recording its own). `months` shortens
 * it for tests; the repair needs more than a year and a half to appear.
 */
export async function seedHistory(db: Db, options: { now?: Date; seed?: number; months?: number } = {}): Promise<HistoryCounts> {
  const [existing] = await db.all<{ n: number }>(sql`SELECT count(*) AS n FROM items WHERE kind = 'pair'`);
  if (Number(existing?.n ?? 0) > 0) return NONE;
  const ref = await loadReference(db);
  if (!ref) return NONE;

  const now = options.now ?? new Date();
  const months = options.months ?? DEFAULT_HISTORY_MONTHS;
  // Each stage draws from a generator of its own, so a change to one stage leaves the others' draws as they were.
  const rng = new Rng(options.seed ?? DEFAULT_HISTORY_SEED);
  const stage = () => rng.fork();
  const world = planWorld(stage(), ref, now, months);
  const plan = new Plan();
  planFlitches(plan, stage(), world.pairs);
  planFreshFlitch(plan, stage(), ref.finishes, ref.models, now);
  const cabinets = stage();
  for (const p of world.pairs) planCabinets(plan, cabinets, p);
  planLacquerToday(plan, stage(), ref.models, ref.finishes, now);
  const serials = new MakerSerials();
  planUnitBatches(plan, stage(), serials, world.pairs, now);
  planLabToday(plan, stage(), serials, now);
  planCrossovers(plan, stage(), world.pairs, world.start, now);
  for (const p of world.pairs) planPairTrim(plan, p);
  planTrimToday(plan, ref.models, now);
  for (const p of world.pairs) planBuild(plan, p);
  const tests = stage();
  for (const p of world.pairs) planFinalTest(plan, tests, p);
  const packing = stage();
  for (const p of world.pairs) planPacking(plan, packing, p);
  planShipments(plan, stage(), world.shipments);
  const repaired = planRepair(plan, stage(), world.pairs, now);
  planOwners(plan, stage(), world.pairs, repaired, now);
  planCases(plan, stage(), world.pairs, repaired, now);

  const before = await tally(db);
  const ctx: Ctx = { db, ref, items: new Map(), sets: new Map(), batches: new Map(), notes: new Map() };
  // Stable order: operations at one instant keep the order they were planned in.
  const ops = plan.ops.filter((op) => op.at <= now).sort((a, b) => a.at.getTime() - b.at.getTime() || a.order - b.order);
  const restore = await quickCommits(db);
  try {
    for (const op of ops) {
      try {
        await atTime(op.at, () => op.run(ctx));
      } catch (e) {
        const detail = e instanceof AppError && e.fieldErrors ? ` ${JSON.stringify(e.fieldErrors)}` : "";
        throw new Error(`history seed: ${op.what} at ${op.at.toISOString()} was refused: ${(e as Error).message}${detail}`, { cause: e });
      }
    }
  } finally {
    await restore();
  }
  const after = await tally(db);
  return {
    pairs: after.pairs,
    shippedPairs: after.shipped,
    pairsInWorkshop: after.pairs - after.shipped,
    shipments: after.shipments,
    items: after.items - before.items,
    owners: after.owners - before.owners,
    ownerships: after.ownerships - before.ownerships,
  };
}
