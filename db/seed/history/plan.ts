/**
 * The history as a plan: dated operations, each one call of the register's own write functions,
 * run in time order with the clock set to their date (lib/clock.ts `atTime`). Operations find what
 * earlier ones made under keys ("pair:12", "pair:12:spk:L") in the run's context.
 */
import type { Db } from "@/db";
import type { Item } from "@/db/schema";
import type { RefFinish, RefModel, Reference } from "./reference";

export interface Ctx {
  db: Db;
  ref: Reference;
  items: Map<string, Item>;
  /** Matched sets reserved and not yet built in, per `${model code}:${part type or "crossover"}`, oldest first. */
  sets: Map<string, { code: string; left: string; right: string }[]>;
  /** Drive-unit batches by key, with their units in serial order. */
  batches: Map<string, { id: string; code: string; units: Item[] }>;
  /** Facts one operation leaves for a later one (the event a correction names, a certificate's id…). */
  notes: Map<string, string | number>;
}

export interface Op {
  at: Date;
  order: number;
  /** What it does, for the message should it fail: a plan bug, never a user's error. */
  what: string;
  run(ctx: Ctx): Promise<void>;
}

export class Plan {
  readonly ops: Op[] = [];
  private order = 0;

  add(at: Date, what: string, run: Op["run"]): void {
    this.ops.push({ at, order: this.order++, what, run });
  }
}

/** An item an earlier operation made. */
export function got(ctx: Ctx, key: string): Item {
  const item = ctx.items.get(key);
  // A plan bug, not a user error: every operation is dated after the ones it depends on.
  if (!item) throw new Error(`history seed: ${key} used before it was made`);
  return item;
}

export const setQueue = (ctx: Ctx, key: string) => {
  let q = ctx.sets.get(key);
  if (!q) ctx.sets.set(key, (q = []));
  return q;
};

export interface Timeline {
  press: Date;
  /** The last step of the cabinet route recorded (hand finish). */
  routeDone: Date;
  crossovers: Date;
  assembly: Date;
  tested: Date;
  packed: Date;
}

export interface PairPlan {
  key: string;
  /** The month of the history it was started in (0 = the first). */
  window: number;
  model: RefModel;
  finish: RefFinish;
  dealer: Reference["dealers"][number];
  t: Timeline;
  /** Set when its shipment date falls before `now`. */
  shippedAt?: Date;
  /** The few pairs the demo tells a story with. */
  story: {
    /** A trim reading out of window that quality has not dispositioned yet. */
    openTrimNc?: boolean;
    /** A polishing cycle over its window, accepted by quality as it is. */
    polishUsedAsIs?: boolean;
    /** A coat's wet film mistyped (1100 µm for 110): corrected with its reason, closed by quality as an entry error. */
    filmSlipCorrected?: boolean;
    /** Failed its first final test; quality sent it back, and it passed the second. */
    failedFirstTest?: boolean;
  };
}
