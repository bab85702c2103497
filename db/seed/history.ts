/**
 * Two invented years of production for the demo workshop: flitches and leaves, cabinets, drive
 * units, crossovers and their component lots, speakers, pairs, cartons, shipments, a few owners
 * and one repair. Everything is planned first in memory from a seeded PRNG (so a given `now` and
 * `seed` always give the same register), then written through the genealogy functions with every
 * step back-dated, one transaction per calendar month. Demo data only: no test of the computation
 * may rely on it.
 */
import type { Station } from "@/lib/vocabulary/stations";
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import type { Db, Tx } from "@/db";
import { batchUnits, responses, tsParams, unitBatches } from "@/db/schema/lab";
import { nonconformances, processSpecs, routeRecords, routeStarts } from "@/db/schema/route";
import { defaultRoute } from "@/lib/route/default-spec";
import { certificates, dealers, finalTests, finishes, flitches, items, leafAllocations, leafDefects, modelPositions, models, owners, ownerships, users, veneerLeaves, type Item } from "@/db/schema";
import { compareResponses } from "@/lib/acoustics";
import { certificateCode, CERTIFICATE_CODE_BYTES } from "@/lib/certificates/code";
import { appendEvent } from "@/lib/events/queries";
import { changeState, createItem, fit, removeFrom, type NewItem, type Recorder } from "@/lib/genealogy/graph";
import { allocateSerial } from "@/lib/serials/allocator";
import { leafIdentity, PART_TYPE_CODES, type PartType, type SerialKind } from "@/lib/serials/format";

export interface HistoryCounts {
  pairs: number;
  shippedPairs: number;
  /** Pairs not yet shipped: veneered pairs in production since their leaves were confirmed, and pairs in assembly, awaiting test, tested or packed. */
  pairsInWorkshop: number;
  shipments: number;
  items: number;
  owners: number;
  ownerships: number;
}

const NONE: HistoryCounts = { pairs: 0, shippedPairs: 0, pairsInWorkshop: 0, shipments: 0, items: 0, owners: 0, ownerships: 0 };

export const DEFAULT_HISTORY_SEED = 0x7a11ea5;

const MIN = 60_000;
const HOUR = 60 * MIN;
const DAY = 24 * HOUR;
/** Months of history by default: two years, enough for a tweeter to fail a year after shipping. */
const DEFAULT_MONTHS = 24;
/** Pairs started per month (inclusive range); kept small so the demo seeds in a few seconds. */
const PAIRS_PER_MONTH: [number, number] = [3, 5];
/** Lots of crossover components are bought about quarterly. */
const LOT_PERIOD_DAYS = 91;
/** Each dealer gets a consolidated shipment every four weeks, the dealers about a week apart. */
const SHIP_CADENCE_DAYS = 28;

// ---- invented suppliers and people ---------------------------------------------------------------

const VENEER_SUPPLIERS = ["Ashgrove Veneer Merchants", "Haldenwald Furniere", "Tallowcreek Timber"] as const;
const TWEETER_MAKER = { name: "Corvane Acoustique", prefix: "CV" } as const;
const CONE_MAKER = { name: "Varnholt Elektroakustik", prefix: "VH" } as const;
const COMPONENT_SUPPLIERS = { capacitor: "Brennholm Passives", inductor: "Quillfield Windings", resistor: "Brennholm Passives" } as const;

type ComponentType = keyof typeof COMPONENT_SUPPLIERS;
const COMPONENT_CODES: Record<ComponentType, string> = { capacitor: "CAP", inductor: "IND", resistor: "RES" };

/** The lots bought each period, one per component value; the letter tells apart the lots of one month. */
const LOT_VALUES: { type: ComponentType; letter: string; value: string }[] = [
  { type: "capacitor", letter: "A", value: "4.7 µF 400 V polypropylene" },
  { type: "capacitor", letter: "B", value: "10 µF 250 V polypropylene" },
  { type: "capacitor", letter: "C", value: "22 µF 100 V polypropylene" },
  { type: "inductor", letter: "A", value: "0.33 mH air core, 0.45 Ω" },
  { type: "inductor", letter: "B", value: "1.5 mH air core, 0.60 Ω" },
  { type: "inductor", letter: "C", value: "2.7 mH foil core, 0.35 Ω" },
  { type: "inductor", letter: "D", value: "4.7 mH foil core, 0.40 Ω" },
  { type: "resistor", letter: "A", value: "2.2 Ω 10 W wirewound" },
  { type: "resistor", letter: "B", value: "3.3 Ω 10 W wirewound" },
  { type: "resistor", letter: "C", value: "6.8 Ω 10 W wirewound" },
];
const lotKeyOf = (gen: number, type: ComponentType, letter: string) => `lot:${gen}:${type}:${letter}`;

/**
 * Which lot value sits at each reference designator of a model's crossover. The 4.7 µF tweeter
 * capacitor is common to all three, so one lot of it ends up in every crossover of its quarter.
 */
const CROSSOVER_BOM: Record<string, [position: string, type: ComponentType, letter: string][]> = {
  PW2: [["C1", "capacitor", "A"], ["C2", "capacitor", "B"], ["L1", "inductor", "A"], ["L2", "inductor", "B"], ["R1", "resistor", "A"], ["R2", "resistor", "C"]],
  SL3: [["C1", "capacitor", "A"], ["C2", "capacitor", "C"], ["L1", "inductor", "A"], ["L2", "inductor", "C"], ["R1", "resistor", "A"], ["R2", "resistor", "B"]],
  TB3: [["C1", "capacitor", "A"], ["C2", "capacitor", "C"], ["L1", "inductor", "A"], ["L2", "inductor", "D"], ["R1", "resistor", "A"], ["R2", "resistor", "B"]],
};
const DEFAULT_BOM = CROSSOVER_BOM.PW2!;

const MODEL_WEIGHTS: Record<string, number> = { PW2: 45, SL3: 35, TB3: 20 };
const FINISH_WEIGHTS: Record<string, number> = { WAL: 30, OAK: 20, CHY: 12, SYC: 8, LSL: 16, LCH: 14 };
const DEALER_WEIGHTS: Record<string, number> = { MLR: 32, KHS: 30, SNV: 22, BLS: 16 };

/** Invented owners; towns are invented too. Matched to pairs sold by a dealer in their country. */
const OWNERS: { name: string; email: string; town: string; country: string; pairs: number }[] = [
  { name: "Edwin Marlowe-Pike", email: "edwin.marlowe-pike@post.test", town: "Thistlecombe", country: "GB", pairs: 2 },
  { name: "Harriet Quenneville", email: "h.quenneville@mail.test", town: "Pellingford", country: "GB", pairs: 1 },
  { name: "Callum Ardrossey", email: "callum@ardrossey.test", town: "Merrowby", country: "GB", pairs: 1 },
  { name: "Ines Vautrin", email: "ines.vautrin@courriel.test", town: "Montcellier-la-Haute", country: "FR", pairs: 1 },
  { name: "Mathilde Roussel-Garnier", email: "m.roussel-garnier@courriel.test", town: "Vaudrey-sur-Lenne", country: "FR", pairs: 2 },
  { name: "Clara Weidenfeld", email: "clara.weidenfeld@post.test", town: "Brunnwiesen", country: "DE", pairs: 1 },
  { name: "Lukas Treuhaft", email: "lukas.treuhaft@mail.test", town: "Haselstedt", country: "DE", pairs: 2 },
  { name: "Birte Ahlgren-Voss", email: "birte.ahlgren-voss@post.test", town: "Kestelbrück", country: "DE", pairs: 1 },
  { name: "Henrik Solbakk", email: "henrik.solbakk@epost.test", town: "Brattvik", country: "NO", pairs: 1 },
  { name: "Ingrid Tveitmoen", email: "ingrid.tveitmoen@epost.test", town: "Eikelund", country: "NO", pairs: 1 },
];

const FAILURE_REASON = "no output above 3 kHz";

// ---- seeded randomness ---------------------------------------------------------------------------

/** mulberry32: small, fast and good enough for invented data; the same seed gives the same history. */
class Rng {
  private a: number;
  constructor(seed: number) {
    this.a = seed >>> 0;
  }
  float(): number {
    this.a = (this.a + 0x6d2b79f5) >>> 0;
    let t = this.a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }
  /** Integer in [lo, hi]. */
  int(lo: number, hi: number): number {
    return lo + Math.floor(this.float() * (hi - lo + 1));
  }
  chance(p: number): boolean {
    return this.float() < p;
  }
  pick<T>(xs: readonly T[]): T {
    return xs[Math.floor(this.float() * xs.length)]!;
  }
  weighted<T>(xs: readonly T[], weight: (x: T) => number): T {
    const total = xs.reduce((s, x) => s + weight(x), 0);
    let r = this.float() * total;
    for (const x of xs) {
      r -= weight(x);
      if (r < 0) return x;
    }
    return xs[xs.length - 1]!;
  }
}

// ---- dates ---------------------------------------------------------------------------------------

const plus = (d: Date, ms: number) => new Date(d.getTime() + ms);

/**
 * `days` after `d` (before it when negative), at `hour` UTC, moved off a weekend: the workshop
 * works Monday to Friday. A step planned back from a later one moves to the Friday before, so
 * it cannot overtake the step it prepares.
 */
function workday(d: Date, days: number, hour: number): Date {
  const out = new Date(d.getTime() + days * DAY);
  out.setUTCHours(hour, 0, 0, 0);
  const dow = out.getUTCDay();
  if (dow === 6) out.setUTCDate(out.getUTCDate() + (days < 0 ? -1 : 2));
  if (dow === 0) out.setUTCDate(out.getUTCDate() + (days < 0 ? -2 : 1));
  return out;
}

const monthKey = (d: Date) => `${d.getUTCFullYear()}-${String(d.getUTCMonth() + 1).padStart(2, "0")}`;
const yymm = (d: Date) => `${String(d.getUTCFullYear() % 100).padStart(2, "0")}${String(d.getUTCMonth() + 1).padStart(2, "0")}`;

// ---- the plan: dated operations on keyed items ---------------------------------------------------

type Role = "veneer" | "cabinet" | "lab" | "assembly" | "packing" | "service";
interface By {
  role: Role;
  station: Station;
}

type IdentitySpec = { serial: { kind: SerialKind; code: string } } | { leafOf: string; leafNo: number } | { fixed: string };
interface ItemSpec extends Omit<NewItem, "identity"> {
  identity: IdentitySpec;
}

interface RunContext {
  tx: Tx;
  items: Map<string, Item>;
  /** Event ids an operation leaves for a later one (the correction names the event it corrects). */
  notes: Map<string, number>;
  counts: { owners: number; ownerships: number };
  recorder(by: By, at: Date): Recorder;
}

interface Op {
  at: Date;
  order: number;
  run(ctx: RunContext): Promise<void>;
}

class Plan {
  readonly ops: Op[] = [];
  private order = 0;
  /** The makers' own running numbers, per plan so every run starts from the same ones. */
  readonly makerSerials = { tweeter: 418_230, cone: 2_207_514 };
  /** When each period's component lots arrive. */
  readonly lotReceipts: Date[] = [];

  add(at: Date, run: Op["run"]): void {
    this.ops.push({ at, order: this.order++, run });
  }

  create(key: string, at: Date, by: By, spec: ItemSpec): void {
    this.add(at, async (ctx) => {
      const { identity, ...rest } = spec;
      let id: string;
      if ("serial" in identity) id = await allocateSerial(ctx.tx, { ...identity.serial, year: at.getUTCFullYear() });
      else if ("leafOf" in identity) id = leafIdentity(get(ctx, identity.leafOf).identity, identity.leafNo);
      else id = identity.fixed;
      ctx.items.set(key, await createItem(ctx.tx, { ...rest, identity: id }, ctx.recorder(by, at)));
    });
  }

  fit(at: Date, by: By, parent: string, child: string, position: string, data?: Record<string, unknown>): void {
    this.add(at, async (ctx) => {
      await fit(ctx.tx, { parent: get(ctx, parent), child: get(ctx, child), position, data }, ctx.recorder(by, at));
    });
  }

  state(at: Date, by: By, key: string, state: string): void {
    this.add(at, async (ctx) => changeState(ctx.tx, get(ctx, key), state, ctx.recorder(by, at)));
  }
}

function get(ctx: RunContext, key: string): Item {
  const item = ctx.items.get(key);
  // A plan bug, not a user error: every operation is dated after the ones it depends on.
  if (!item) throw new Error(`history seed: ${key} used before it was created`);
  return item;
}

// ---- reference data ------------------------------------------------------------------------------

interface RefModel {
  id: string;
  code: string;
  leavesPerFace: number;
  minLeafLengthMm: number;
  minLeafWidthMm: number;
  pairGtin: string;
  /** The final pair test: |L − R| limit over the model's range. */
  pairResponseLimitDb: number;
  responseMinHz: number;
  responseMaxHz: number;
  positions: { position: string; partType: PartType }[];
}
interface Reference {
  models: RefModel[];
  finishes: { id: string; code: string; name: string; kind: "veneer" | "lacquer" }[];
  dealers: { id: string; code: string; country: string }[];
  actors: Map<Role, string>;
}

async function loadReference(db: Db): Promise<Reference | null> {
  const modelRows = await db.select().from(models).where(eq(models.active, true)).orderBy(models.code);
  const positionRows = await db.select().from(modelPositions).orderBy(modelPositions.position);
  const finishRows = await db.select().from(finishes).where(eq(finishes.active, true)).orderBy(finishes.code);
  const dealerRows = await db.select().from(dealers).where(eq(dealers.active, true)).orderBy(dealers.code);
  const userRows = await db.select({ id: users.id, email: users.email }).from(users).where(eq(users.demo, true));
  if (modelRows.length === 0 || finishRows.length === 0 || dealerRows.length === 0) return null;

  const actors = new Map<Role, string>();
  for (const role of ["veneer", "cabinet", "lab", "assembly", "packing", "service"] as const) {
    const u = userRows.find((r) => r.email === `${role}@demo.twinleaf.test`);
    if (u) actors.set(role, u.id);
  }
  return {
    models: modelRows.map((m) => ({
      id: m.id,
      code: m.code,
      leavesPerFace: m.leavesPerFace,
      minLeafLengthMm: m.minLeafLengthMm,
      minLeafWidthMm: m.minLeafWidthMm,
      pairGtin: m.pairGtin,
      pairResponseLimitDb: m.pairResponseLimitDb,
      responseMinHz: m.responseMinHz,
      responseMaxHz: m.responseMaxHz,
      // A position with count n holds n units: P1..Pn.
      positions: positionRows
        .filter((p) => p.modelId === m.id)
        .flatMap((p) =>
          p.count === 1 ? [{ position: p.position, partType: p.partType }] : Array.from({ length: p.count }, (_, i) => ({ position: `${p.position}${i + 1}`, partType: p.partType })),
        ),
    })),
    finishes: finishRows.map((f) => ({ id: f.id, code: f.code, name: f.name, kind: f.kind })),
    dealers: dealerRows.map((d) => ({ id: d.id, code: d.code, country: d.country })),
    actors,
  };
}

// ---- planning ------------------------------------------------------------------------------------

interface Timeline {
  press: Date;
  cure: Date;
  finished: Date;
  unitsIn: Date;
  crossoverBuilt: Date;
  assembly: Date;
  built: Date;
  tested: Date;
  packed: Date;
}

interface PairPlan {
  key: string;
  window: number;
  model: RefModel;
  finish: Reference["finishes"][number];
  dealer: Reference["dealers"][number];
  t: Timeline;
  /** Set when its shipment date falls before `now`. */
  shippedAt?: Date;
  /** Drive-unit keys by side and position, for the repair. */
  units: Record<"L" | "R", Record<string, string>>;
}

const VENEER: By = { role: "veneer", station: "veneer" };
const at = (role: Role, station: Station): By => ({ role, station });

function timeline(rng: Rng, press: Date, lacquer: boolean): Timeline {
  // Trimming, bracing, sanding and the coats before flatting; lacquer colours take more coats.
  const cure = workday(press, lacquer ? rng.int(6, 9) : rng.int(4, 7), 15);
  // About two weeks of curing, then flatting, polishing and the hand finish.
  const finished = workday(cure, 14 + rng.int(2, 4), 16);
  const assembly = workday(finished, rng.int(1, 6), 9);
  const unitsIn = new Date(Math.max(press.getTime() + DAY, workday(assembly, -rng.int(4, 18), 11).getTime()));
  const crossoverBuilt = new Date(Math.max(unitsIn.getTime() + HOUR, workday(assembly, -rng.int(2, 8), 14).getTime()));
  const built = workday(assembly, 1, 16);
  const tested = workday(built, rng.int(1, 3), 11);
  const packed = workday(tested, rng.int(1, 3), 14);
  return { press, cure, finished, unitsIn, crossoverBuilt, assembly, built, tested, packed };
}

function shiftTimeline(t: Timeline, ms: number): Timeline {
  return Object.fromEntries(Object.entries(t).map(([k, d]) => [k, plus(d, ms)])) as unknown as Timeline;
}

interface Planned {
  plan: Plan;
  pairs: PairPlan[];
}

function planHistory(ref: Reference, now: Date, seed: number, months: number): Planned {
  const rng = new Rng(seed);
  const plan = new Plan();
  const start = plus(now, -months * 30.4 * DAY);
  const windowMs = (now.getTime() - start.getTime()) / months;
  const weight = (table: Record<string, number>) => (x: { code: string }) => table[x.code] ?? 5;

  // Pairs and their timelines.
  const pairs: PairPlan[] = [];
  for (let w = 0; w < months; w++) {
    const n = rng.int(...PAIRS_PER_MONTH);
    const starts = Array.from({ length: n }, () => plus(start, w * windowMs + rng.float() * windowMs)).sort((a, b) => a.getTime() - b.getTime());
    for (const s of starts) {
      const model = rng.weighted(ref.models, weight(MODEL_WEIGHTS));
      const finish = rng.weighted(ref.finishes, weight(FINISH_WEIGHTS));
      const dealer = rng.weighted(ref.dealers, weight(DEALER_WEIGHTS));
      const press = workday(s, 0, 8 + rng.int(0, 3));
      pairs.push({ key: `pair:${pairs.length}`, window: w, model, finish, dealer, t: timeline(rng, press, finish.kind === "lacquer"), units: { L: {}, R: {} } });
    }
  }

  // A few veneered pairs pressed in the last days, so the cabinet shop has work at several stations.
  const veneers = ref.finishes.filter((f) => f.kind === "veneer");
  for (const d of [1, 4, 8, 12]) {
    const model = rng.weighted(ref.models, weight(MODEL_WEIGHTS));
    const finish = rng.weighted(veneers, weight(FINISH_WEIGHTS));
    const dealer = rng.weighted(ref.dealers, weight(DEALER_WEIGHTS));
    const press = workday(now, -d, 8 + rng.int(0, 2));
    pairs.push({ key: `pair:${pairs.length}`, window: months - 1, model, finish, dealer, t: timeline(rng, press, false), units: { L: {}, R: {} } });
  }

  // Pin a few of the last pairs to moments just before `now`, so the workshop always shows one
  // pair at each late step whatever the random draw: in assembly, awaiting test, tested, packed.
  // Each is shifted whole so its earlier steps keep their order; the steps after `now` are set
  // explicitly because weekends make the planned gaps uneven.
  const h = (hours: number) => plus(now, hours * HOUR);
  const anchors: ((t: Timeline) => Timeline)[] = [
    (t) => ({ ...shiftTimeline(t, h(-4).getTime() - t.assembly.getTime()), built: h(20), tested: h(44), packed: h(68) }),
    (t) => ({ ...shiftTimeline(t, h(-40).getTime() - t.assembly.getTime()), built: h(-12), tested: h(24), packed: h(48) }),
    (t) => ({ ...shiftTimeline(t, h(-20).getTime() - t.tested.getTime()), packed: h(24) }),
    (t) => shiftTimeline(t, h(-48).getTime() - t.packed.getTime()),
  ];
  // Taken from the two months before the last, so the last month's own pairs stay at the press.
  const late = pairs.filter((p) => p.window >= months - 3 && p.window <= months - 2).slice(-anchors.length);
  late.forEach((p, i) => (p.t = anchors[i]!(p.t)));

  // Shipping: the first consolidated shipment of the pair's dealer after it was packed.
  const dealerIndex = new Map(ref.dealers.map((d, i) => [d.id, i]));
  const shipments = new Map<string, { dealer: PairPlan["dealer"]; at: Date; pairs: PairPlan[] }>();
  for (const p of pairs) {
    // Every dealer's day is a weekday, afternoon, at least five days back (the cadence keeps the
    // weekday), so a pair packed in the last two days is always still waiting.
    const base = workday(now, -(5 + 6 * (dealerIndex.get(p.dealer.id)! % 4)), 15).getTime();
    const cadence = SHIP_CADENCE_DAYS * DAY;
    let ship = base - Math.floor((base - p.t.packed.getTime()) / cadence) * cadence;
    if (ship - p.t.packed.getTime() < 12 * HOUR) ship += cadence;
    if (ship > now.getTime()) continue;
    p.shippedAt = new Date(ship);
    const key = `${p.dealer.id}:${ship}`;
    const group = shipments.get(key) ?? { dealer: p.dealer, at: p.shippedAt, pairs: [] };
    group.pairs.push(p);
    shipments.set(key, group);
  }

  planLots(plan, rng, start, now);
  planFlitches(plan, rng, pairs);
  planRoutes(plan, rng, pairs, now);
  for (const p of pairs) planPair(plan, rng, p);
  // The sign-offs draw from a generator of their own, so adding them changed no other draw of the history.
  const signOffs = new Rng(seed ^ SIGN_OFF_SALT);
  for (const p of pairs) planSignOffs(plan, signOffs, p, now);
  planShipments(plan, [...shipments.values()]);
  const repaired = planRepair(plan, rng, pairs, now);
  planStock(plan, rng, ref, now);
  planFreshFlitch(plan, rng, ref, now);
  planLabBatches(plan, rng, now);
  planOwners(plan, rng, pairs, repaired, now);
  return { plan, pairs };
}

/** The newest period whose lots had arrived (all of them, hence the hour's margin) by `d`. */
function lotGeneration(plan: Plan, d: Date): number {
  let g = 0;
  while (g + 1 < plan.lotReceipts.length && plus(plan.lotReceipts[g + 1]!, HOUR) <= d) g++;
  return g;
}

function planLots(plan: Plan, rng: Rng, start: Date, now: Date) {
  const lab = at("lab", "lab");
  // The first lots arrive before the first crossover of the history is built.
  const first = plus(start, -20 * DAY);
  for (let g = 0; ; g++) {
    const received = workday(first, g * LOT_PERIOD_DAYS, 10);
    if (received > now) break;
    plan.lotReceipts.push(received);
    for (const lot of LOT_VALUES) {
      const key = lotKeyOf(g, lot.type, lot.letter);
      plan.create(key, plus(received, rng.int(0, 30) * MIN), lab, {
        kind: "component_lot",
        partType: lot.type,
        state: "in_stock",
        identity: { fixed: `LOT-${COMPONENT_CODES[lot.type]}-${yymm(received)}-${lot.letter}` },
        attrs: { supplier: COMPONENT_SUPPLIERS[lot.type], value: lot.value },
      });
      // Used up once the next period's lot arrives.
      const next = workday(first, (g + 1) * LOT_PERIOD_DAYS, 12);
      if (next <= now) plan.state(next, lab, key, "used_up");
    }
  }
}

function planFlitches(plan: Plan, rng: Rng, pairs: PairPlan[]) {
  // One flitch per species and month serves that month's veneered pairs in pressing order.
  const groups = new Map<string, PairPlan[]>();
  for (const p of pairs) {
    if (p.finish.kind !== "veneer") continue;
    const key = `${p.finish.code}:${p.window}`;
    groups.set(key, [...(groups.get(key) ?? []), p]);
  }
  for (const [groupKey, group] of groups) {
    group.sort((a, b) => a.t.press.getTime() - b.t.press.getTime());
    const finish = group[0]!.finish;
    const flitchKey = `flitch:${groupKey}`;
    const received = workday(group[0]!.t.press, -rng.int(8, 20), 10);
    const lengthMm = Math.max(...group.map((p) => p.model.minLeafLengthMm)) + rng.int(20, 140);
    const widthMm = Math.max(...group.map((p) => p.model.minLeafWidthMm)) + rng.int(12, 60);
    const supplier = rng.pick(VENEER_SUPPLIERS);
    const logReference = `LOG-${rng.int(1000, 9899)}-${rng.pick(["A", "B", "C"])}`;
    plan.create(flitchKey, received, VENEER, {
      kind: "flitch",
      finishId: finish.id,
      state: "received",
      identity: { serial: { kind: "flitch", code: finish.code } },
      attrs: { species: finish.name, supplier, logReference, leafThicknessMm: 0.6 },
    });

    // Leaf numbers: each pair takes a run of 2k, sometimes with a reserve leaf after it for repairs.
    let next = 1;
    const runs: { pair: PairPlan; leaves: number[]; reserve?: number }[] = [];
    for (const p of group) {
      const leaves = Array.from({ length: 2 * p.model.leavesPerFace }, (_, i) => next + i);
      next += leaves.length;
      const reserve = rng.chance(0.4) ? next++ : undefined;
      runs.push({ pair: p, leaves, reserve });
    }
    const leafCount = next - 1 + rng.int(1, 3);
    const recorded = plus(received, DAY);
    plan.add(plus(received, MIN), async (ctx) => {
      const flitch = get(ctx, flitchKey);
      const by = ctx.recorder(VENEER, plus(received, MIN));
      const eventId = await appendEvent(ctx.tx, {
        actorId: by.actorId,
        station: VENEER.station,
        type: "flitch.received",
        subjectKind: "item",
        subjectId: flitch.id,
        data: { identity: flitch.identity, species: finish.name, supplier, logReference, leafCount },
        at: by.at,
      });
      await ctx.tx.insert(flitches).values({ itemId: flitch.id, finishId: finish.id, logReference, supplier, receivedOn: received.toISOString().slice(0, 10), leafThicknessMm: 0.6, leafCount, eventId });
    });
    for (let n = 1; n <= leafCount; n++) {
      const key = `${flitchKey}:leaf:${n}`;
      const size = { lengthMm: lengthMm + rng.int(-4, 4), widthMm: widthMm + rng.int(-6, 6) };
      plan.create(key, plus(recorded, n * MIN), VENEER, { kind: "leaf", finishId: finish.id, state: "available", identity: { leafOf: flitchKey, leafNo: n }, attrs: { seq: n } });
      plan.add(plus(recorded, n * MIN), async (ctx) => {
        await ctx.tx.insert(veneerLeaves).values({ itemId: get(ctx, key).id, flitchId: get(ctx, flitchKey).id, seq: n, ...size, usable: true });
      });
    }

    for (const { pair, leaves, reserve } of runs) {
      // The run is confirmed the day before pressing: the pair and its two cabinets are born with
      // their leaves, the left face as cut and the right face turned over (the bookmatch).
      const allocated = plus(pair.t.press, -18 * HOUR);
      const model = pair.model;
      plan.create(pair.key, allocated, VENEER, { kind: "pair", modelId: model.id, finishId: finish.id, state: "in_production", identity: { serial: { kind: "pair", code: model.code } } });
      for (const side of SIDES) {
        const cab = `${pair.key}:cab:${side}`;
        plan.create(cab, plus(allocated, MIN), VENEER, { kind: "cabinet", modelId: model.id, finishId: finish.id, state: "in_progress", identity: { serial: { kind: "cabinet", code: model.code } }, attrs: { side } });
        plan.fit(plus(allocated, 2 * MIN), VENEER, pair.key, cab, `CAB-${side}`);
      }
      const when = plus(allocated, 3 * MIN);
      leaves.forEach((n, i) => {
        const side = i % 2 === 0 ? "L" : "R";
        plan.fit(when, VENEER, `${pair.key}:cab:${side}`, `${flitchKey}:leaf:${n}`, `F${Math.floor(i / 2) + 1}`, { orientation: side === "R" ? "turned" : "as_cut" });
        plan.state(when, VENEER, `${flitchKey}:leaf:${n}`, "used");
      });
      if (reserve !== undefined) plan.state(when, VENEER, `${flitchKey}:leaf:${reserve}`, "reserved");
      plan.add(when, async (ctx) => {
        const by = ctx.recorder(VENEER, when);
        const pairItem = get(ctx, pair.key);
        const cabinets = { L: get(ctx, `${pair.key}:cab:L`), R: get(ctx, `${pair.key}:cab:R`) };
        const eventId = await appendEvent(ctx.tx, {
          actorId: by.actorId,
          station: VENEER.station,
          type: "veneer.run_confirmed",
          subjectKind: "item",
          subjectId: pairItem.id,
          data: { pair: pairItem.identity, flitch: get(ctx, flitchKey).identity, left: leaves.filter((_, i) => i % 2 === 0), right: leaves.filter((_, i) => i % 2 === 1), reserve: reserve === undefined ? [] : [reserve], leftCabinet: cabinets.L.identity, rightCabinet: cabinets.R.identity },
          at: when,
        });
        const rows = leaves.map((n, i) => {
          const side = i % 2 === 0 ? "L" : "R";
          return { leafId: get(ctx, `${flitchKey}:leaf:${n}`).id, pairId: pairItem.id, role: "face" as const, cabinetId: cabinets[side].id, position: `F${Math.floor(i / 2) + 1}`, orientation: side === "R" ? ("turned" as const) : ("as_cut" as const), startedAt: when, eventId };
        });
        if (reserve !== undefined) rows.push({ leafId: get(ctx, `${flitchKey}:leaf:${reserve}`).id, pairId: pairItem.id, role: "reserve" as never, cabinetId: null as never, position: null as never, orientation: null as never, startedAt: when, eventId });
        await ctx.tx.insert(leafAllocations).values(rows);
      });
    }
  }
}

const SIDES = ["L", "R"] as const;

/**
 * The cabinet route of the veneered pairs still in production when the demo opens: each step
 * recorded at a plausible time after the press (holds respected), so the shop's home shows pairs
 * at every station. The newest pair past trimming has a trim reading out of window and an open
 * nonconformance for quality to disposition. Invented demo data, never a check.
 */
function planRoutes(plan: Plan, rng: Rng, pairs: PairPlan[], now: Date) {
  const steps = defaultRoute();
  // Veneered pairs travel as pairs; a lacquer pair's cabinets travel alone until assembly pairs them.
  const live = pairs.filter((p) => p.t.assembly > now);
  const offsets = new Map<string, number>([
    ["press", 0],
    ["trim", 2 * HOUR],
    ["brace", 3 * HOUR],
    ["sanding", DAY],
    ["check-sanding", DAY + HOUR],
    ["flatting", 3 * DAY],
  ]);
  const coatAt = (n: number) => (n <= 4 ? 2 * DAY + (n - 1) * 2 * HOUR : 3 * DAY + 2 * HOUR + (n - 5) * 2 * HOUR);
  let ncGiven = false;
  const sorted = [...live].sort((a, b) => b.t.press.getTime() - a.t.press.getTime());
  for (const p of sorted) {
    const cure = p.t.press.getTime() + coatAt(8) + 14 * DAY;
    const timeOf = (key: string): number => {
      if (key.startsWith("coat-")) return p.t.press.getTime() + coatAt(Number(key.slice(5)));
      if (key === "machine-polish") return cure + HOUR;
      if (key === "check-polish") return cure + 3 * HOUR;
      if (key === "hand-finish") return cure + 5 * HOUR;
      return p.t.press.getTime() + offsets.get(key)!;
    };
    const done = steps.filter((s) => timeOf(s.key) + 30 * MIN <= now.getTime());
    if (!done.length) continue;
    const lacquer = p.finish.kind === "lacquer";
    const trimBad = !lacquer && !ncGiven && done.some((s) => s.key === "trim");
    if (trimBad) ncGiven = true;
    for (const step of done) {
      const startedAt = new Date(timeOf(step.key));
      const recordedAt = plus(startedAt, step.key === "brace" ? 2 * HOUR + 10 * MIN : 25 * MIN);
      if (trimBad && step.seq > steps.find((s) => s.key === "trim")!.seq) break;
      const readings: Record<string, number | boolean> = {};
      for (const r of step.readings) {
        if (r.kind === "check") readings[r.key] = true;
        else if (r.equals !== undefined) readings[r.key] = r.equals;
        else if (r.absMax !== undefined) readings[r.key] = trimBad && step.key === "trim" ? 0.24 : Math.round(rng.float() * 15) / 100;
        else if (r.min !== undefined && r.max !== undefined) readings[r.key] = r.min + Math.round(rng.float() * (r.max - r.min));
        else readings[r.key] = (r.min ?? 0) + rng.int(5, 15);
      }
      const out = trimBad && step.key === "trim";
      const station = step.station === "inspection" ? "sanding" : step.station;
      for (const group of lacquer ? SIDES.map((side) => [side] as const) : [SIDES]) plan.add(recordedAt, async (ctx) => {
        const pair = lacquer ? get(ctx, `${p.key}:cab:${group[0]}`) : get(ctx, p.key);
        const cabinets = lacquer ? [{ id: pair.id, side: "L" as const }] : group.map((side) => ({ id: get(ctx, `${p.key}:cab:${side}`).id, side }));
        const [spec] = await ctx.tx.select().from(processSpecs).where(eq(processSpecs.modelId, p.model.id));
        if (!spec) return;
        const by = ctx.recorder(at("cabinet", station), recordedAt);
        if (step.seq === 1) {
          const startEvent = await appendEvent(ctx.tx, { actorId: by.actorId, station, type: "route.started", subjectKind: "item", subjectId: pair.id, data: { identity: pair.identity, specVersion: spec.version }, at: recordedAt });
          await ctx.tx.insert(routeStarts).values({ pairId: pair.id, specId: spec.id, eventId: startEvent });
        }
        let first = 0;
        for (const c of cabinets) {
          const e = await appendEvent(ctx.tx, { actorId: by.actorId, station, type: "route.step_recorded", subjectKind: "item", subjectId: c.id, data: { identity: lacquer ? pair.identity : get(ctx, `${p.key}:cab:${c.side}`).identity, pair: pair.identity, seq: step.seq, step: step.name, side: c.side, readings, outOfWindow: out ? ["deviationMm"] : [], startedAt: startedAt.toISOString() }, at: recordedAt });
          first ||= e;
        }
        const [record] = await ctx.tx.insert(routeRecords).values({ pairId: pair.id, specId: spec.id, seq: step.seq, cabinets, startedAt, recordedAt, readings, outOfWindow: out, eventId: first }).returning({ id: routeRecords.id });
        if (out) {
          const code = `NC-${recordedAt.toISOString().slice(2, 4)}${recordedAt.toISOString().slice(5, 7)}-001`;
          const finding = "Trim deviation 0.24 mm (window ±0.2 mm)";
          const e = await appendEvent(ctx.tx, { actorId: by.actorId, station, type: "nc.opened", subjectKind: "item", subjectId: pair.id, data: { identity: pair.identity, code, step: step.name, seq: step.seq, finding, sides: ["L", "R"] }, at: recordedAt });
          await ctx.tx.insert(nonconformances).values({ id: randomUUID(), code, pairId: pair.id, recordId: record!.id, cabinets, seq: step.seq, finding, openedAt: recordedAt, openedEventId: e });
        }
      });
    }
  }
}

/**
 * A flitch received two days ago, measured, with a split leaf and a knot noted, and not yet
 * planned: the veneer room's next job when the demo opens.
 */
function planFreshFlitch(plan: Plan, rng: Rng, ref: Reference, now: Date) {
  const finish = ref.finishes.find((f) => f.kind === "veneer");
  if (!finish) return;
  const model = [...ref.models].sort((a, b) => a.leavesPerFace - b.leavesPerFace)[0]!;
  const key = "flitch:fresh";
  const received = workday(now, -2, 10);
  const leafCount = 24;
  const supplier = rng.pick(VENEER_SUPPLIERS);
  const logReference = `LOG-${rng.int(1000, 9899)}-${rng.pick(["A", "B", "C"])}`;
  plan.create(key, received, VENEER, { kind: "flitch", finishId: finish.id, state: "received", identity: { serial: { kind: "flitch", code: finish.code } }, attrs: { species: finish.name, supplier, logReference, leafThicknessMm: 0.6 } });
  plan.add(plus(received, MIN), async (ctx) => {
    const flitch = get(ctx, key);
    const by = ctx.recorder(VENEER, plus(received, MIN));
    const eventId = await appendEvent(ctx.tx, { actorId: by.actorId, station: VENEER.station, type: "flitch.received", subjectKind: "item", subjectId: flitch.id, data: { identity: flitch.identity, species: finish.name, supplier, logReference, leafCount }, at: by.at });
    await ctx.tx.insert(flitches).values({ itemId: flitch.id, finishId: finish.id, logReference, supplier, receivedOn: received.toISOString().slice(0, 10), leafThicknessMm: 0.6, leafCount, eventId });
  });
  const lengthMm = model.minLeafLengthMm + rng.int(30, 90);
  const widthMm = model.minLeafWidthMm + rng.int(15, 40);
  // Leaf 9 is split along its length; leaf 16 has a small knot near its butt end that trims off.
  const defects: Record<number, { kind: "split" | "knot"; note: string; positionMm: number | null; usable: boolean }> = {
    9: { kind: "split", note: "runs most of the leaf", positionMm: null, usable: false },
    16: { kind: "knot", note: "small, near the butt end", positionMm: 12, usable: true },
  };
  for (let n = 1; n <= leafCount; n++) {
    const leafKey = `${key}:leaf:${n}`;
    const when = plus(received, (60 + n) * MIN);
    // The last leaves of a flitch taper: the final two are short for this model.
    const size = { lengthMm: n > leafCount - 2 ? model.minLeafLengthMm - rng.int(20, 60) : lengthMm + rng.int(-4, 4), widthMm: widthMm + rng.int(-6, 6) };
    plan.create(leafKey, when, VENEER, { kind: "leaf", finishId: finish.id, state: "available", identity: { leafOf: key, leafNo: n }, attrs: { seq: n } });
    plan.add(when, async (ctx) => {
      const leaf = get(ctx, leafKey);
      const defect = defects[n];
      await ctx.tx.insert(veneerLeaves).values({ itemId: leaf.id, flitchId: get(ctx, key).id, seq: n, ...size, usable: defect ? defect.usable : true });
      if (defect) {
        const by = ctx.recorder(VENEER, when);
        const eventId = await appendEvent(ctx.tx, { actorId: by.actorId, station: VENEER.station, type: "leaf.defect_noted", subjectKind: "item", subjectId: leaf.id, data: { identity: leaf.identity, seq: n, kind: defect.kind, note: defect.note, positionMm: defect.positionMm }, at: when });
        await ctx.tx.insert(leafDefects).values({ leafId: leaf.id, kind: defect.kind, note: defect.note, positionMm: defect.positionMm, eventId });
      }
    });
  }
}

function planPair(plan: Plan, rng: Rng, p: PairPlan) {
  const { t, model } = p;
  const lab = at("lab", "lab");
  const assembly = at("assembly", "assembly");
  const cabinetStation = p.finish.kind === "veneer" ? "press" : "lacquer";
  const sides = ["L", "R"] as const;

  const veneered = p.finish.kind === "veneer";
  for (const side of sides) {
    const cab = `${p.key}:cab:${side}`;
    if (veneered) {
      plan.state(t.press, at("cabinet", cabinetStation), cab, "pressed");
      plan.state(t.cure, at("cabinet", "cure"), cab, "curing");
      plan.state(t.finished, at("cabinet", "finish"), cab, "finished");
      continue;
    }
    plan.create(cab, plus(t.press, (side === "L" ? 0 : 1) * MIN), at("cabinet", cabinetStation), {
      kind: "cabinet",
      modelId: model.id,
      finishId: p.finish.id,
      state: "in_progress",
      identity: { serial: { kind: "cabinet", code: model.code } },
      attrs: { side },
    });
    plan.state(t.cure, at("cabinet", "cure"), cab, "curing");
    plan.state(t.finished, at("cabinet", "finish"), cab, "finished");
  }

  // Drive units arrive measured and matched at the lab, left and right together.
  let minute = 0;
  for (const { position, partType } of model.positions) {
    for (const side of sides) {
      const key = `${p.key}:du:${side}:${position}`;
      p.units[side][position] = key;
      plan.create(key, plus(t.unitsIn, minute++ * MIN), lab, driveUnit(plan, rng, model, partType));
    }
  }

  const gen = lotGeneration(plan, t.crossoverBuilt);
  for (const side of sides) {
    const xo = `${p.key}:xo:${side}`;
    const built = plus(t.crossoverBuilt, (side === "L" ? 0 : 20) * MIN);
    plan.create(xo, built, assembly, { kind: "crossover", modelId: model.id, state: "in_stock", identity: { serial: { kind: "crossover", code: model.code } } });
    for (const [position, type, letter] of CROSSOVER_BOM[model.code] ?? DEFAULT_BOM) {
      plan.fit(plus(built, MIN), assembly, xo, lotKeyOf(gen, type, letter), position);
    }
  }

  for (const side of sides) {
    const spk = `${p.key}:spk:${side}`;
    const begun = plus(t.assembly, (side === "L" ? 0 : 45) * MIN);
    plan.create(spk, begun, assembly, {
      kind: "speaker",
      modelId: model.id,
      finishId: p.finish.id,
      state: "in_assembly",
      identity: { serial: { kind: "speaker", code: model.code } },
      attrs: { side },
    });
    const step = plus(begun, MIN);
    if (veneered) {
      // The cabinet leaves the pair's hold to become part of its speaker.
      plan.add(step, async (ctx) => {
        const by = ctx.recorder(assembly, step);
        await removeFrom(ctx.tx, { parent: get(ctx, p.key), child: get(ctx, `${p.key}:cab:${side}`) }, { ...by, reason: "built into its speaker" });
      });
    }
    plan.fit(step, assembly, spk, `${p.key}:cab:${side}`, "CAB");
    for (const { position } of model.positions) {
      plan.fit(step, assembly, spk, p.units[side][position]!, position);
      plan.state(step, assembly, p.units[side][position]!, "fitted");
    }
    plan.fit(step, assembly, spk, `${p.key}:xo:${side}`, "XO");
    plan.state(step, assembly, `${p.key}:xo:${side}`, "fitted");
    plan.state(t.built, assembly, spk, "built");
  }

  const paired = plus(t.assembly, 2 * HOUR);
  if (veneered) plan.state(t.assembly, assembly, p.key, "in_assembly");
  else {
    plan.create(p.key, paired, assembly, {
      kind: "pair",
      modelId: model.id,
      finishId: p.finish.id,
      state: "in_assembly",
      identity: { serial: { kind: "pair", code: model.code } },
    });
  }
  for (const side of sides) plan.fit(plus(paired, MIN), assembly, p.key, `${p.key}:spk:${side}`, side);
  plan.state(t.built, assembly, p.key, "awaiting_test");
  plan.state(t.tested, lab, p.key, "tested");

  const packing = at("packing", "packing");
  const carton = `${p.key}:carton`;
  plan.create(carton, t.packed, packing, {
    kind: "carton",
    modelId: model.id,
    state: "packed",
    identity: { serial: { kind: "carton", code: model.code } },
    attrs: { gtin: model.pairGtin },
  });
  plan.fit(plus(t.packed, MIN), packing, carton, p.key, "PAIR");
  plan.state(plus(t.packed, MIN), packing, p.key, "packed");
}

const SIGN_OFF_SALT = 0x5c3a71f;

/**
 * An invented finished-speaker response over the model's range, 1/12 octave: a shared voicing
 * (gentle ripples, the bass roll-off at the bottom of the range, a soft top) plus each speaker's
 * own small, smooth deviation. Demo data only, never a check.
 */
function finalResponses(rng: Rng, model: RefModel): { L: number[][]; R: number[][] } {
  const level = 86 + 1.5 * gauss(rng);
  const voicing = [0.5 * gauss(rng), 0.35 * gauss(rng), 0.25 * gauss(rng)];
  const phase = [rng.float() * 6.3, rng.float() * 6.3, rng.float() * 6.3];
  const own = (["L", "R"] as const).map(() => ({ a: [0.07 * gauss(rng), 0.06 * gauss(rng), 0.05 * gauss(rng)], p: [rng.float() * 6.3, rng.float() * 6.3, rng.float() * 6.3], offset: 0.08 * gauss(rng) }));
  const hz: number[] = [];
  for (let k = 0; ; k++) {
    const f = model.responseMinHz * 2 ** (k / 12);
    if (f > model.responseMaxHz * (1 + 1e-9)) break;
    hz.push(f);
  }
  if (hz[hz.length - 1]! < model.responseMaxHz * 0.999) hz.push(model.responseMaxHz);
  const curve = (side: 0 | 1, scale: number) =>
    hz.map((f) => {
      const x = Math.log2(f / 1000);
      const base = level + voicing.reduce((sum, a, i) => sum + a * Math.sin((i + 1) * 0.9 * x + phase[i]!), 0) - 4 / (1 + (f / (1.3 * model.responseMinHz)) ** 4) - 1.2 * (f / model.responseMaxHz) ** 2;
      const o = own[side]!;
      const dev = o.offset + o.a.reduce((sum, a, i) => sum + a * Math.sin((i + 1) * 1.4 * x + o.p[i]!), 0);
      return [Math.round(f * 100) / 100, Math.round((base + scale * dev) * 1000) / 1000];
    });
  // A pair that reached the carton passed: should a draw come out over the limit, the two are closer.
  for (let scale = 1; ; scale /= 2) {
    const out = { L: curve(0, scale), R: curve(1, scale) };
    const cmp = compareResponses(toPoints(out.L), toPoints(out.R), { minHz: model.responseMinHz, maxHz: model.responseMaxHz, limitDb: model.pairResponseLimitDb });
    if (cmp.maxAbsDiffDb <= 0.8 * model.pairResponseLimitDb || scale < 1e-3) return out;
  }
}

const toPoints = (pts: number[][]) => pts.map(([hz, db]) => ({ hz: hz!, db: db! }));

/**
 * The records of the late steps: the final clean and inspection at assembly, the final pair test
 * in the lab with both finished responses, and for a pair that was packed its certificate (issued
 * and printed, to go in the carton) and the packer's sign-off.
 */
function planSignOffs(plan: Plan, rng: Rng, p: PairPlan, now: Date) {
  const { t, model } = p;
  const assembly = at("assembly", "assembly");
  const lab = at("lab", "lab");
  const packing = at("packing", "packing");

  plan.add(t.built, async (ctx) => {
    const pair = get(ctx, p.key);
    await appendEvent(ctx.tx, { actorId: ctx.recorder(assembly, t.built).actorId, station: "assembly", type: "pair.inspected", subjectKind: "item", subjectId: pair.id, data: { identity: pair.identity }, at: t.built });
  });

  if (t.tested > now) return;
  // Drawn for every tested pair in plan order, whatever `now` cuts off later, so the draws stay aligned.
  const curves = finalResponses(rng, model);
  const comparison = compareResponses(toPoints(curves.L), toPoints(curves.R), { minHz: model.responseMinHz, maxHz: model.responseMaxHz, limitDb: model.pairResponseLimitDb });
  const tested = plus(t.tested, -10 * MIN);
  plan.add(tested, async (ctx) => {
    const pair = get(ctx, p.key);
    const by = ctx.recorder(lab, tested);
    const ids: number[] = [];
    for (const side of SIDES) {
      const speaker = get(ctx, `${p.key}:spk:${side}`);
      const points = curves[side];
      const fileName = `${speaker.identity}-final.txt`;
      const eventId = await appendEvent(ctx.tx, { actorId: by.actorId, station: "lab", type: "unit.response_measured", subjectKind: "item", subjectId: speaker.id, data: { identity: speaker.identity, purpose: "final", points: points.length, fileName }, at: tested });
      const [row] = await ctx.tx.insert(responses).values({ itemId: speaker.id, purpose: "final", points, fileName, source: "upload", eventId, createdAt: tested }).returning({ id: responses.id });
      ids.push(row!.id);
    }
    const limitDb = model.pairResponseLimitDb;
    const eventId = await appendEvent(ctx.tx, {
      actorId: by.actorId,
      station: "lab",
      type: "pair.final_tested",
      subjectKind: "item",
      subjectId: pair.id,
      data: { identity: pair.identity, pass: comparison.pass, maxDiffDb: comparison.maxAbsDiffDb, worstBand: comparison.worstBand, limitDb, minHz: model.responseMinHz, maxHz: model.responseMaxHz },
      at: tested,
    });
    await ctx.tx.insert(finalTests).values({ pairId: pair.id, leftResponseId: ids[0]!, rightResponseId: ids[1]!, limitDb, maxDiffDb: comparison.maxAbsDiffDb, worstBand: comparison.worstBand, pass: comparison.pass, eventId, createdAt: tested });
  });

  if (t.packed > now) return;
  const code = certificateCode(Uint8Array.from({ length: CERTIFICATE_CODE_BYTES }, () => rng.int(0, 255)));
  // Issued and printed just before packing: the certificate goes into the carton with the pair.
  const issued = plus(t.packed, -30 * MIN);
  plan.add(issued, async (ctx) => {
    const pair = get(ctx, p.key);
    const by = ctx.recorder(packing, issued);
    const id = randomUUID();
    const eventId = await appendEvent(ctx.tx, { actorId: by.actorId, station: "packing", type: "certificate.issued", subjectKind: "item", subjectId: pair.id, data: { identity: pair.identity, certificateId: id }, at: issued });
    await ctx.tx.insert(certificates).values({ id, pairId: pair.id, code, issuedAt: issued, eventId });
    await appendEvent(ctx.tx, { actorId: by.actorId, station: "packing", type: "certificate.printed", subjectKind: "item", subjectId: pair.id, data: { identity: pair.identity, certificateId: id, copy: false }, at: plus(issued, MIN) });
  });
  const packed = plus(t.packed, MIN);
  plan.add(packed, async (ctx) => {
    const pair = get(ctx, p.key);
    await appendEvent(ctx.tx, { actorId: ctx.recorder(packing, packed).actorId, station: "packing", type: "pair.packed", subjectKind: "item", subjectId: pair.id, data: { identity: pair.identity, carton: get(ctx, `${p.key}:carton`).identity }, at: packed });
  });
}

function driveUnit(plan: Plan, rng: Rng, model: RefModel, partType: PartType): ItemSpec {
  const tweeter = partType === "tweeter";
  const maker = tweeter ? TWEETER_MAKER : CONE_MAKER;
  const counter = tweeter ? "tweeter" : "cone";
  // Units reach the lab sorted by the maker's own measurements, so their numbers have gaps.
  const makerSerials = plan.makerSerials;
  makerSerials[counter] += rng.int(1, 37);
  return {
    kind: "drive_unit",
    modelId: model.id,
    partType,
    state: "in_stock",
    identity: { serial: { kind: "drive_unit", code: PART_TYPE_CODES[partType] } },
    attrs: { maker: maker.name, makerSerial: `${maker.prefix}${makerSerials[counter]}` },
  };
}

function planShipments(plan: Plan, groups: { dealer: PairPlan["dealer"]; at: Date; pairs: PairPlan[] }[]) {
  const packing = at("packing", "packing");
  groups.sort((a, b) => a.at.getTime() - b.at.getTime());
  groups.forEach((g, i) => {
    const key = `shipment:${i}`;
    plan.create(key, g.at, packing, {
      kind: "shipment",
      dealerId: g.dealer.id,
      state: "shipped",
      identity: { serial: { kind: "shipment", code: g.dealer.code } },
    });
    g.pairs.forEach((p, n) => {
      const when = plus(g.at, (n + 1) * MIN);
      plan.fit(when, packing, key, `${p.key}:carton`, String(n + 1));
      plan.state(when, packing, `${p.key}:carton`, "shipped");
      plan.state(when, packing, p.key, "shipped");
    });
  });
}

/** A tweeter that went silent about a year after shipping, replaced from stock by the service desk. */
function planRepair(plan: Plan, rng: Rng, pairs: PairPlan[], now: Date): PairPlan | null {
  const candidates = pairs.filter((p) => p.shippedAt && p.shippedAt.getTime() < now.getTime() - 420 * DAY && p.units.L.T);
  if (candidates.length === 0) return null;
  const p = rng.pick(candidates);
  const side = rng.pick(["L", "R"] as const);
  const service = at("service", "service");
  const spk = `${p.key}:spk:${side}`;
  const failed = p.units[side].T!;
  const returned = workday(p.shippedAt!, rng.int(330, 380), 10);
  const repaired = workday(returned, 3, 14);

  const stock = `${p.key}:replacement:T`;
  plan.create(stock, workday(returned, -rng.int(40, 90), 11), at("lab", "lab"), driveUnit(plan, rng, p.model, "tweeter"));

  plan.state(returned, service, spk, "returned");
  plan.add(repaired, async (ctx) => {
    const by = ctx.recorder(service, repaired);
    const speaker = get(ctx, spk);
    const old = get(ctx, failed);
    const removal = await removeFrom(ctx.tx, { parent: speaker, child: old }, { ...by, reason: FAILURE_REASON });
    ctx.notes.set("repair.removal", removal.eventId);
    await changeState(ctx.tx, old, "failed", by);
    const replacement = get(ctx, stock);
    await fit(ctx.tx, { parent: speaker, child: replacement, position: "T", data: { replaces: old.identity } }, by);
    await changeState(ctx.tx, replacement, "fitted", by);
  });
  plan.state(plus(repaired, DAY), service, spk, "repaired");

  // The bench found more than the first note said: a correction names the event it corrects.
  const corrected = workday(repaired, 6, 9);
  if (corrected <= now) {
    plan.add(corrected, async (ctx) => {
      await appendEvent(ctx.tx, {
        actorId: ctx.recorder(service, corrected).actorId,
        station: "service",
        type: "event.corrected",
        subjectKind: "item",
        subjectId: get(ctx, failed).id,
        correctsId: ctx.notes.get("repair.removal")!,
        reason: "Bench measurement added: the voice coil is open circuit, so the removal note was incomplete.",
        data: { identity: get(ctx, failed).identity, field: "reason", from: FAILURE_REASON, to: `${FAILURE_REASON}; voice coil open circuit` },
        at: corrected,
      });
    });
  }
  return p;
}

/** Spare units the service desk can choose a replacement from. */
/** Gaussian noise for the invented measurements (Box–Muller). */
function gauss(rng: Rng): number {
  return Math.sqrt(-2 * Math.log(1 - rng.float())) * Math.cos(2 * Math.PI * rng.float());
}

/**
 * An invented tweeter response: a second-order high-pass at `fc` with quality `q`, a gentle top
 * roll-off, and the unit's own small, smooth deviations. Demo data only, never a check.
 */
function tweeterResponse(rng: Rng, level: number): number[][] {
  const fc = 1000 * (1 + 0.04 * gauss(rng));
  const q = 0.8 + 0.05 * gauss(rng);
  const ripple = [0.12 * gauss(rng), 0.1 * gauss(rng), 0.08 * gauss(rng)];
  const phase = [rng.float() * 6.3, rng.float() * 6.3, rng.float() * 6.3];
  const out: number[][] = [];
  for (let k = 0; k <= 24 * 5.3; k++) {
    const hz = 500 * 2 ** (k / 24);
    if (hz > 20500) break;
    const r = hz / fc;
    const hp = 20 * Math.log10((r * r) / Math.sqrt((1 - r * r) ** 2 + (r / q) ** 2));
    const top = -10 * Math.log10(1 + (hz / 28000) ** 4);
    const x = Math.log2(hz / 500);
    const dev = ripple.reduce((sum, a, i) => sum + a * Math.sin((i + 1) * 1.3 * x + phase[i]!), 0);
    out.push([Math.round(hz * 100) / 100, Math.round((level + hp + top + dev) * 1000) / 1000]);
  }
  return out;
}

/**
 * Two batches at the lab when the demo opens: tweeters measured three days ago and ready to match,
 * and bass units that arrived yesterday and wait for the bench.
 */
function planLabBatches(plan: Plan, rng: Rng, now: Date) {
  const lab = at("lab", "lab");
  const batches = [
    { key: "batch:tw", partType: "tweeter" as const, partNumber: "DT-25N", maker: TWEETER_MAKER, count: 12, received: workday(now, -4, 9), measured: true },
    { key: "batch:bs", partType: "bass" as const, partNumber: "W18-PX", maker: CONE_MAKER, count: 8, received: workday(now, -1, 9), measured: false },
  ];
  for (const b of batches) {
    const id = randomUUID();
    const code = `${PART_TYPE_CODES[b.partType]}-${b.received.toISOString().slice(2, 4)}${b.received.toISOString().slice(5, 7)}-01`;
    const lot = `${b.maker.prefix}-${rng.int(2400, 2999)}`;
    plan.add(b.received, async (ctx) => {
      const by = ctx.recorder(lab, b.received);
      const eventId = await appendEvent(ctx.tx, { actorId: by.actorId, station: "lab", type: "batch.received", subjectKind: "batch", subjectId: id, data: { code, partType: b.partType, partNumber: b.partNumber, maker: b.maker.name, lot, count: b.count }, at: b.received });
      await ctx.tx.insert(unitBatches).values({ id, code, partType: b.partType, partNumber: b.partNumber, maker: b.maker.name, lot, receivedOn: b.received.toISOString().slice(0, 10), eventId, createdAt: b.received });
    });
    const counter = b.partType === "tweeter" ? "tweeter" : "cone";
    for (let i = 0; i < b.count; i++) {
      const key = `${b.key}:${i}`;
      plan.makerSerials[counter] += rng.int(1, 9);
      const makerSerial = `${b.maker.prefix}${plan.makerSerials[counter]}`;
      const made = plus(b.received, (i + 1) * MIN);
      plan.create(key, made, lab, {
        kind: "drive_unit",
        partType: b.partType,
        state: "awaiting_measurement",
        identity: { serial: { kind: "drive_unit", code: PART_TYPE_CODES[b.partType] } },
        attrs: { maker: b.maker.name, partNumber: b.partNumber, batch: code, makerSerial },
      });
      plan.add(made, async (ctx) => {
        await ctx.tx.insert(batchUnits).values({ itemId: get(ctx, key).id, batchId: id, makerSerial });
      });
      if (!b.measured) continue;
      const when = plus(b.received, 2 * HOUR + i * 6 * MIN);
      const points = tweeterResponse(rng, 90 + 0.15 * gauss(rng));
      const ts = { fsHz: Math.round(900 * (1 + 0.03 * gauss(rng))), qes: Math.round((1.1 + 0.05 * gauss(rng)) * 1000) / 1000, qms: Math.round((2.2 + 0.1 * gauss(rng)) * 1000) / 1000, reOhm: Math.round((4.7 + 0.05 * gauss(rng)) * 100) / 100 };
      plan.add(when, async (ctx) => {
        const unit = get(ctx, key);
        const by = ctx.recorder(lab, when);
        const rEvent = await appendEvent(ctx.tx, { actorId: by.actorId, station: "lab", type: "unit.response_measured", subjectKind: "item", subjectId: unit.id, data: { identity: unit.identity, points: points.length, fileName: `${makerSerial}.txt`, source: "upload" }, at: when });
        await ctx.tx.insert(responses).values({ itemId: unit.id, points, fileName: `${makerSerial}.txt`, source: "upload", eventId: rEvent, createdAt: when });
        const qts = Math.round(((ts.qes * ts.qms) / (ts.qes + ts.qms)) * 1000) / 1000;
        const tEvent = await appendEvent(ctx.tx, { actorId: by.actorId, station: "lab", type: "unit.ts_measured", subjectKind: "item", subjectId: unit.id, data: { identity: unit.identity, ...ts, qts, source: "csv" }, at: when });
        await ctx.tx.insert(tsParams).values({ itemId: unit.id, ...ts, qts, sensitivityDb: null, vasL: null, source: "csv", eventId: tEvent, createdAt: when });
        await changeState(ctx.tx, unit, "measured", by);
      });
    }
  }
}

function planStock(plan: Plan, rng: Rng, ref: Reference, now: Date) {
  const lab = at("lab", "lab");
  let n = 0;
  for (const model of ref.models) {
    const types = [...new Set(model.positions.map((p) => p.partType))];
    for (const partType of types) {
      const count = partType === "tweeter" ? 3 : 2;
      for (let i = 0; i < count; i++) {
        plan.create(`stock:${n++}`, workday(now, -rng.int(10, 240), 11), lab, driveUnit(plan, rng, model, partType));
      }
    }
  }
}

function planOwners(plan: Plan, rng: Rng, pairs: PairPlan[], repaired: PairPlan | null, now: Date) {
  const service = at("service", "service");
  const taken = new Set<string>();
  const registered = (p: PairPlan) => workday(p.shippedAt!, rng.int(14, 75), 10);
  // The repaired pair's owner is the one the service desk writes to, so it must have one.
  const pool = pairs.filter((p) => p.shippedAt && p.shippedAt.getTime() < now.getTime() - 90 * DAY);
  for (const owner of OWNERS) {
    const mine: PairPlan[] = [];
    if (repaired && !taken.has(repaired.key) && repaired.dealer.country === owner.country) mine.push(repaired);
    const rest = pool.filter((p) => p.dealer.country === owner.country && !taken.has(p.key) && p !== repaired);
    while (mine.length < owner.pairs && rest.length > 0) mine.push(rest.splice(rng.int(0, rest.length - 1), 1)[0]!);
    if (mine.length === 0) continue;
    for (const p of mine) taken.add(p.key);

    const id = randomUUID();
    const dated = mine.map((p) => ({ p, since: registered(p) })).sort((a, b) => a.since.getTime() - b.since.getTime());
    plan.add(dated[0]!.since, async (ctx) => {
      await ctx.tx.insert(owners).values({ id, name: owner.name, email: owner.email, town: owner.town, country: owner.country, createdAt: dated[0]!.since });
      ctx.counts.owners++;
    });
    for (const { p, since } of dated) {
      plan.add(plus(since, MIN), async (ctx) => {
        const pair = get(ctx, p.key);
        const eventId = await appendEvent(ctx.tx, {
          actorId: ctx.recorder(service, since).actorId,
          station: "service",
          type: "ownership.registered",
          subjectKind: "item",
          subjectId: pair.id,
          data: { identity: pair.identity, ownerId: id },
          at: since,
        });
        await ctx.tx.insert(ownerships).values({ ownerId: id, itemId: pair.id, since, eventId });
        ctx.counts.ownerships++;
      });
    }
  }
}

// ---- writing -------------------------------------------------------------------------------------

/**
 * Seeds the invented production history ending at `now`. Skips entirely when the register already
 * holds a pair (a second run, or a workshop that has started recording its own). `months` shortens
 * it for tests; the repair needs more than a year and a half to appear.
 */
export async function seedHistory(db: Db, options: { now?: Date; seed?: number; months?: number } = {}): Promise<HistoryCounts> {
  const [existing] = await db.select({ id: items.id }).from(items).where(eq(items.kind, "pair")).limit(1);
  if (existing) return NONE;
  const ref = await loadReference(db);
  if (!ref) return NONE;

  const now = options.now ?? new Date();
  const { plan, pairs } = planHistory(ref, now, options.seed ?? DEFAULT_HISTORY_SEED, options.months ?? DEFAULT_MONTHS);
  // Stable sort: operations at one instant keep the order they were planned in.
  const ops = plan.ops.filter((op) => op.at <= now).sort((a, b) => a.at.getTime() - b.at.getTime() || a.order - b.order);

  const byMonth = new Map<string, Op[]>();
  for (const op of ops) {
    const key = monthKey(op.at);
    const list = byMonth.get(key);
    if (list) list.push(op);
    else byMonth.set(key, [op]);
  }

  const created = new Map<string, Item>();
  const notes = new Map<string, number>();
  const counts = { owners: 0, ownerships: 0 };
  const recorder = (by: By, when: Date): Recorder => ({ actorId: ref.actors.get(by.role) ?? null, station: by.station, at: when });
  for (const monthOps of byMonth.values()) {
    await db.transaction(async (tx) => {
      const ctx: RunContext = { tx, items: created, notes, counts, recorder };
      for (const op of monthOps) await op.run(ctx);
    });
  }

  const pairItems = pairs.map((p) => created.get(p.key)).filter((i): i is Item => i !== undefined);
  return {
    pairs: pairItems.length,
    shippedPairs: pairItems.filter((i) => i.state === "shipped").length,
    pairsInWorkshop: pairItems.filter((i) => i.state !== "shipped").length,
    shipments: [...created.values()].filter((i) => i.kind === "shipment").length,
    items: created.size,
    owners: counts.owners,
    ownerships: counts.ownerships,
  };
}
