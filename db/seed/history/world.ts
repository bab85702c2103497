/**
 * Which pairs the invented workshop starts, of which model, finish and dealer, and when each
 * reaches each station; the pairs pinned just before `now` so the demo always shows work at every
 * late station; the consolidated shipments to dealers; the pairs a story is told with.
 */
import { DAY, HOUR, plus, workday, type Rng } from "./basics";
import type { PairPlan, Timeline } from "./plan";
import type { Reference } from "./reference";
import { routeSchedule } from "./route";

/**
 * Pairs started per month (inclusive range): a small workshop's pace, and few enough that the
 * history (some forty calls of the register's functions a pair) seeds in well under a minute.
 */
const PAIRS_PER_MONTH: [number, number] = [2, 4];
/** Each dealer gets a consolidated shipment every four weeks, the dealers about a week apart. */
const SHIP_CADENCE_DAYS = 28;

const MODEL_WEIGHTS: Record<string, number> = { PW2: 45, SL3: 35, TB3: 20 };
// Lacquer is the lesser part of the work (and its cabinets each walk the route alone).
const FINISH_WEIGHTS: Record<string, number> = { WAL: 30, OAK: 20, CHY: 12, SYC: 8, LSL: 10, LCH: 8 };
const DEALER_WEIGHTS: Record<string, number> = { MLR: 32, KHS: 30, SNV: 22, BLS: 16 };

export interface Shipment {
  dealer: Reference["dealers"][number];
  at: Date;
  pairs: PairPlan[];
}

export interface World {
  start: Date;
  pairs: PairPlan[];
  shipments: Shipment[];
}

function timeline(rng: Rng, press: Date): Timeline {
  const routeDone = routeSchedule(press).at(-1)!.recorded;
  const assembly = workday(routeDone, rng.int(1, 6), 9);
  const crossovers = workday(assembly, -rng.int(2, 8), 14);
  const tested = workday(assembly, rng.int(1, 3), 11);
  const packed = workday(tested, rng.int(1, 3), 14);
  return { press, routeDone, crossovers, assembly, tested, packed };
}

const shift = (t: Timeline, ms: number): Timeline => Object.fromEntries(Object.entries(t).map(([k, d]) => [k, plus(d, ms)])) as unknown as Timeline;

export function planWorld(rng: Rng, ref: Reference, now: Date, months: number): World {
  const start = plus(now, -months * 30.4 * DAY);
  const windowMs = (now.getTime() - start.getTime()) / months;
  const weight = (table: Record<string, number>) => (x: { code: string }) => table[x.code] ?? 5;
  const pairs: PairPlan[] = [];
  const add = (window: number, press: Date, veneerOnly = false) => {
    const model = rng.weighted(ref.models, weight(MODEL_WEIGHTS));
    const finish = rng.weighted(veneerOnly ? ref.finishes.filter((f) => f.kind === "veneer") : ref.finishes, weight(FINISH_WEIGHTS));
    const dealer = rng.weighted(ref.dealers, weight(DEALER_WEIGHTS));
    pairs.push({ key: `pair:${pairs.length}`, window, model, finish, dealer, t: timeline(rng, press), story: {} });
  };

  for (let w = 0; w < months; w++) {
    const n = rng.int(...PAIRS_PER_MONTH);
    const starts = Array.from({ length: n }, () => plus(start, w * windowMs + rng.float() * windowMs)).sort((a, b) => a.getTime() - b.getTime());
    for (const s of starts) add(w, workday(s, 0, 8 + rng.int(0, 3)));
  }
  // A few veneered pairs pressed in the last days, so the cabinet shop has work at several stations.
  for (const d of [1, 4, 8, 12]) add(months - 1, workday(now, -d, 8 + rng.int(0, 2)), true);

  // Pin a few pairs started two to four months back to moments just before `now`, so the demo
  // always shows a pair at each late station whatever the draw: ready to build, built and awaiting
  // its test, tested and ready to pack (two), packed and waiting to ship. Each is shifted whole so
  // its earlier steps keep their order; the steps after `now` are set explicitly.
  const h = (hours: number) => plus(now, hours * HOUR);
  const to = (t: Timeline, key: keyof Timeline, at: Date) => shift(t, at.getTime() - t[key].getTime());
  const anchors: ((t: Timeline) => Timeline)[] = [
    (t) => ({ ...to(t, "routeDone", h(-30)), crossovers: h(-50), assembly: h(20), tested: h(44), packed: h(68) }),
    (t) => ({ ...to(t, "assembly", h(-4)), tested: h(20), packed: h(44) }),
    (t) => ({ ...to(t, "tested", h(-44)), packed: h(30) }),
    (t) => ({ ...to(t, "tested", h(-20)), packed: h(24) }),
    (t) => to(t, "packed", h(-48)),
  ];
  const late = pairs.filter((p) => p.window >= months - 4 && p.window <= months - 2).slice(-anchors.length);
  late.forEach((p, i) => (p.t = anchors[i]!(p.t)));

  // Shipping: the first consolidated shipment of the pair's dealer after it was packed.
  const dealerIndex = new Map(ref.dealers.map((d, i) => [d.id, i]));
  const groups = new Map<string, Shipment>();
  for (const p of pairs) {
    // Every dealer's day is a weekday afternoon at least five days back (the cadence keeps the
    // weekday), so a pair packed in the last two days is always still waiting.
    const base = workday(now, -(5 + 6 * (dealerIndex.get(p.dealer.id)! % 4)), 15).getTime();
    const cadence = SHIP_CADENCE_DAYS * DAY;
    let ship = base - Math.floor((base - p.t.packed.getTime()) / cadence) * cadence;
    if (ship - p.t.packed.getTime() < 12 * HOUR) ship += cadence;
    if (ship > now.getTime()) continue;
    p.shippedAt = new Date(ship);
    const key = `${p.dealer.id}:${ship}`;
    const group = groups.get(key) ?? { dealer: p.dealer, at: p.shippedAt, pairs: [] };
    group.pairs.push(p);
    groups.set(key, group);
  }

  // The stories. The newest veneered pair in production past trimming has a trim reading out of
  // window, not yet dispositioned: the pair waits for quality when the demo opens.
  const trimmed = (p: PairPlan) => routeSchedule(p.t.press).find((s) => s.key === "trim")!.recorded <= now;
  const live = pairs.filter((p) => p.finish.kind === "veneer" && p.t.routeDone > now && trimmed(p)).sort((a, b) => b.t.press.getTime() - a.t.press.getTime());
  if (live[0]) live[0].story.openTrimNc = true;
  // Long shipped: one veneered pair polished too long and accepted as it is, and one that failed
  // its first final test, was reworked and passed.
  const old = pairs.filter((p) => p.shippedAt && p.window >= 2);
  const polished = old.find((p) => p.finish.kind === "veneer");
  if (polished) polished.story.polishUsedAsIs = true;
  const slipped = old.find((p) => p !== polished && p.finish.kind === "veneer");
  if (slipped) slipped.story.filmSlipCorrected = true;
  const retested = old.find((p) => p !== polished && p.t.packed.getTime() - p.t.tested.getTime() > 20 * HOUR);
  if (retested) retested.story.failedFirstTest = true;

  return { start, pairs, shipments: [...groups.values()].sort((a, b) => a.at.getTime() - b.at.getTime()) };
}
