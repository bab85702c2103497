/**
 * The synthetic register the benchmarks share: years of production of the demo's T/M/B1/B2
 * floor-stander, written with multi-row INSERTs into a freshly migrated database (see
 * bench/README.md for its shape). Never part of `npm test`.
 */
import { readFileSync } from "node:fs";
import { resolve } from "node:path";
import { performance } from "node:perf_hooks";
import type { InStatement, InValue } from "@libsql/client";
import { openClient } from "@/db";
import { eventHash, GENESIS_HASH } from "@/lib/audit/chain";
import { SEED_DEALERS, SEED_FINISHES, SEED_MODELS } from "@/db/seed/data";
import { batchCode, formatSerial, leafIdentity, makerLotIdentity, PART_TYPE_CODES, type SerialKind } from "@/lib/serials";
import { caseCode } from "@/lib/service/code";
import { containmentCode } from "@/lib/containments/code";
import { inventedDealers, inventedOwners, s10Tracking } from "./people";

// ---------------------------------------------------------------------------------------------
// Shape of the synthetic register
// ---------------------------------------------------------------------------------------------

/** Years of production and pairs a year. The trace benchmark's default: 25,000 pairs, 40 links a pair (+ repairs) → just over 1,000,000 links. */
export interface RegisterShape {
  years: number;
  pairsPerYear: number;
}
export const TRACE_SHAPE: RegisterShape = { years: 20, pairsPerYear: 1250 };
/** The search benchmark's register: 42,500 pairs, just over 1,000,000 items (serials print two-digit years, so ≤ 25 years back from 2025). */
export const SEARCH_SHAPE: RegisterShape = { years: 25, pairsPerYear: 1700 };
/** Dealers and owners beside the demo's: a few hundred dealers, tens of thousands of owners. */
const EXTRA_DEALERS = 300;
const OWNERS = 30_000;
const CONTAINMENTS_PER_YEAR = 3;
const MIN_LINKS = 1_000_000;
const CARTONS_PER_SHIPMENT = 20;
const LEAVES_PER_FLITCH = 32; // one flitch faces the 8 cabinets of 4 pairs
const REPAIR_RATE = 0.03; // share of speakers that had a drive unit replaced
const LOTS_PER_POSITION_PER_YEAR = 30; // × 8 positions = 240 lots a year
const BIG_LOT_CROSSOVERS = 5200; // the bulk-bought capacitor lot: ≥ 5,000 crossovers hold it

const END_YEAR = 2025;
const END = Date.UTC(END_YEAR, 0, 1);
const DAY = 86_400_000;

const SPEAKER_POSITIONS = ["CAB", "T", "M", "B1", "B2", "XO"] as const;
/** Invented drive-unit makers, one per part type, each with its own lot and serial style. */
const MAKERS = {
  tweeter: { name: "Orvelle Transducers", partNumber: "OT-25D", lotPrefix: "OT", serial: (rng: Rng, _n: number) => `T${pad(rng.int(1e9), 9)}` },
  midrange: { name: "Brannock Cone Works", partNumber: "BC-150P", lotPrefix: "BC", serial: (rng: Rng, _n: number) => `${pad(rng.int(1e6), 6)}-${pad(rng.int(1e4), 4)}` },
  bass: { name: "Halvard Elements", partNumber: "HE-260W", lotPrefix: "L", serial: (rng: Rng, _n: number) => `HE${rng.u32().toString(36).toUpperCase().padStart(7, "0")}` },
} as const;
const DRIVE_UNITS = [
  { position: "T", partType: "tweeter", code: "T" },
  { position: "M", partType: "midrange", code: "M" },
  { position: "B1", partType: "bass", code: "B" },
  { position: "B2", partType: "bass", code: "B" },
] as const;
const LOT_POSITIONS = [
  { position: "C1", partType: "capacitor", values: ["2.2 µF", "3.3 µF", "4.7 µF"] },
  { position: "C2", partType: "capacitor", values: ["6.8 µF", "8.2 µF", "10 µF"] },
  { position: "C3", partType: "capacitor", values: ["15 µF", "22 µF"] },
  { position: "C4", partType: "capacitor", values: ["33 µF", "47 µF"] },
  { position: "L1", partType: "inductor", values: ["0.33 mH", "0.47 mH"] },
  { position: "L2", partType: "inductor", values: ["1.8 mH", "2.2 mH"] },
  { position: "R1", partType: "resistor", values: ["2.2 Ω", "3.3 Ω"] },
  { position: "R2", partType: "resistor", values: ["6.8 Ω", "8.2 Ω"] },
] as const;

// ---------------------------------------------------------------------------------------------
// Seeded randomness, so two runs build the same register and time the same targets
// ---------------------------------------------------------------------------------------------

/** sfc32: small, fast, and with 128 bits of state enough for 600,000 distinct random ids. */
export function prng(seed: number) {
  let a = 0x9e3779b9, b = 0x243f6a88, c = 0xb7e15162, d = seed >>> 0;
  const u32 = () => {
    const t = (((a + b) | 0) + d) | 0;
    d = (d + 1) | 0;
    a = b ^ (b >>> 9);
    b = (c + (c << 3)) | 0;
    c = (c << 21) | (c >>> 11);
    c = (c + t) | 0;
    return t >>> 0;
  };
  for (let i = 0; i < 15; i++) u32();
  const float = () => u32() / 4294967296;
  const int = (n: number) => Math.floor(float() * n);
  const pick = <T>(list: readonly T[]): T => list[int(list.length)]!;
  return { u32, float, int, pick };
}
export type Rng = ReturnType<typeof prng>;

const idBytes = Buffer.alloc(16);
/** Same shape as lib/auth/tokens newId() (15 random bytes, base64url), but repeatable. */
export function randomId(rng: Rng): string {
  for (let i = 0; i < 16; i += 4) idBytes.writeUInt32LE(rng.u32(), i);
  return idBytes.subarray(0, 15).toString("base64url");
}

const pad = (n: number, w: number) => String(n).padStart(w, "0");
const yearOf = (ms: number) => new Date(ms).getUTCFullYear();

// ---------------------------------------------------------------------------------------------
// Bulk building
// ---------------------------------------------------------------------------------------------

const ITEM_COLS = ["id", "kind", "identity", "model_id", "finish_id", "part_type", "state", "dealer_id", "attrs", "created_at"];
const LINK_COLS = ["parent_id", "parent_kind", "parent_identity", "child_id", "position", "shared", "started_at", "ended_at", "fit_event_id", "remove_event_id"];
const ROWS_PER_INSERT = 500; // 5,000 bound values at most, far below SQLite's limit of 32,766

export function multiRowInserts(table: string, cols: string[], rows: InValue[][]): InStatement[] {
  const tuple = `(${cols.map(() => "?").join(",")})`;
  const out: InStatement[] = [];
  for (let i = 0; i < rows.length; i += ROWS_PER_INSERT) {
    const chunk = rows.slice(i, i + ROWS_PER_INSERT);
    out.push({ sql: `INSERT INTO ${table} (${cols.join(",")}) VALUES ${Array(chunk.length).fill(tuple).join(",")}`, args: chunk.flat() });
  }
  return out;
}

export interface Built {
  links: number;
  items: number;
  /** Rows of the other searchable tables. */
  dealers: number;
  owners: number;
  makerSerials: number;
  serviceCases: number;
  containments: number;
  pairIds: string[];
  bigLotId: string;
  bigLotIdentity: string;
  repairs: number;
  seconds: number;
}

export async function buildRegister(url: string, shape: RegisterShape = TRACE_SHAPE): Promise<Built> {
  const t0 = performance.now();
  const { years: YEARS, pairsPerYear: PAIRS_PER_YEAR } = shape;
  const PAIRS = YEARS * PAIRS_PER_YEAR;
  const BIG_LOT_FIRST_PAIR = 7 * PAIRS_PER_YEAR + 300;
  const START_YEAR = END_YEAR - YEARS;
  if (START_YEAR < 2000) throw new Error(`bench: serials print two-digit years from 2000; ${YEARS} years back from ${END_YEAR} starts in ${START_YEAR}`);
  const START = Date.UTC(START_YEAR, 0, 1);
  const rng = prng(20_050_101);
  const client = openClient(url);
  // A throwaway file: durability buys nothing here, and a big page cache keeps the randomly keyed
  // indexes in memory while they grow. The client is used strictly sequentially, so both pragmas
  // stay on its one pooled connection. Foreign keys, checks and triggers stay on: the data obey
  // the same schema the app writes to.
  await client.execute("PRAGMA synchronous = OFF");
  await client.execute("PRAGMA cache_size = -524288");

  const model = SEED_MODELS.find(
    (m) => m.leavesPerFace === 4 && m.positions.map((p) => p.position).join() === "T,M,B1,B2",
  );
  if (!model) throw new Error("bench: the seed data no longer has a T/M/B1/B2 model with four leaves a face");
  const { positions: _p, tolerances: _t, ...modelRow } = model;
  const modelId = randomId(rng);
  const veneers = SEED_FINISHES.filter((f) => f.kind === "veneer").map((f) => ({ ...f, id: randomId(rng) }));
  const allDealers = [...SEED_DEALERS, ...inventedDealers(rng, EXTRA_DEALERS, new Set(SEED_DEALERS.map((d) => d.code)))].map((d) => ({ ...d, id: randomId(rng) }));
  const dealerIds = allDealers.map((d) => d.id);
  const dealerCode = new Map(allDealers.map((d) => [d.id, d.code]));
  const owners = inventedOwners(rng, OWNERS).map((o) => ({ ...o, id: randomId(rng) }));
  const benchUser = randomId(rng);

  // Every link's fit_event_id (and every repair's remove_event_id) points at this one event:
  // a million real events would only slow the build, and the traces never read events.
  // Items get created_event_id NULL for the same reason.
  const setup = await client.batch(
    [
      {
        sql: `INSERT INTO models (id, code, name, leaves_per_face, min_leaf_length_mm, min_leaf_width_mm, pair_response_limit_db, response_min_hz, response_max_hz, pair_gtin)
              VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
        args: [modelId, modelRow.code, modelRow.name, modelRow.leavesPerFace, modelRow.minLeafLengthMm, modelRow.minLeafWidthMm,
          modelRow.pairResponseLimitDb, modelRow.responseMinHz, modelRow.responseMaxHz, modelRow.pairGtin],
      },
      ...veneers.map((f) => ({ sql: "INSERT INTO finishes (id, code, name, kind, detail) VALUES (?, ?, ?, ?, ?)", args: [f.id, f.code, f.name, f.kind, f.detail ?? ""] })),
      ...multiRowInserts("dealers", ["id", "code", "name", "city", "country", "email"], allDealers.map((d) => [d.id, d.code, d.name, d.city, d.country, d.email])),
      ...multiRowInserts("owners", ["id", "name", "email", "town", "country"], owners.map((o) => [o.id, o.name, o.email, o.town, o.country])),
      // Who raised the containments (raised_by names a user).
      { sql: "INSERT INTO users (id, email, name) VALUES (?, 'quality@bench.test', 'Bench quality')", args: [benchUser] },
      // The first event of a fresh log, chained as appendEvent would (a trigger refuses it otherwise).
      {
        sql: "INSERT INTO events (id, at, station, type, subject_kind, subject_id, data, prev_hash, hash) VALUES (1, ?, 'bench', 'bench.synthetic', 'bench', 'trace', '{}', ?, ?)",
        args: [START, GENESIS_HASH, eventHash({ id: 1, at: START, actorId: null, station: "bench", type: "bench.synthetic", subjectKind: "bench", subjectId: "trace", data: "{}", reason: null, correctsId: null }, GENESIS_HASH)],
      },
    ],
    "write",
  );
  const benchEvent = Number(setup.at(-1)!.lastInsertRowid);

  // Serials as lib/serials/allocator.ts issues them: one sequence per kind, code and year.
  const sequences = new Map<string, number>();
  const serial = (kind: SerialKind, code: string, madeIn: number) => {
    // Parts made just before the first pair of the first year are numbered in that year.
    const year = Math.max(START_YEAR, madeIn);
    const key = `${kind}:${code}:${year}`;
    const seq = (sequences.get(key) ?? 0) + 1;
    sequences.set(key, seq);
    return formatSerial({ kind, code, year, seq });
  };
  const monthly = new Map<string, number>();
  const nextInMonth = (prefix: string) => {
    const n = (monthly.get(prefix) ?? 0) + 1;
    monthly.set(prefix, n);
    return n;
  };
  const day = (ms: number) => new Date(ms).toISOString().slice(0, 10);

  // Production dates first: pair p is finished at pairTime[p]; a shipment leaves two days after
  // its last carton is packed.
  const pairTime = new Float64Array(PAIRS);
  for (let p = 0; p < PAIRS; p++) pairTime[p] = START + ((p + rng.float()) / PAIRS) * (END - START - 30 * DAY);
  const shipTime = (s: number) => pairTime[Math.min(PAIRS - 1, (s + 1) * CARTONS_PER_SHIPMENT - 1)]! + 3 * DAY;

  const pairIds: string[] = [];
  let bigLotId = "";
  let bigLotIdentity = "";
  let driveUnitSeq = 0;
  let repairs = 0;
  let itemCount = 0;
  let linkCount = 0;
  let flitch = { code: "", finishId: "", nextLeaf: LEAVES_PER_FLITCH };
  let makerSerials = 0;
  let serviceCases = 0;
  let containments = 0;
  // Drive-unit batches, one a month per part type, each from a maker's lot: batch code → batch id.
  const batches = new Map<string, string>();
  let shipmentId = "";
  // Each link carries its parent's kind and identity (lib/genealogy/graph.ts copies them at fitting).
  const parentCopy = new Map<string, [string, string]>();

  for (let year = 0; year < YEARS; year++) {
    const ty = performance.now();
    const items: InValue[][] = [];
    const links: InValue[][] = [];
    const unitBatchRows: InValue[][] = [];
    const batchUnitRows: InValue[][] = [];
    const flitchRows: InValue[][] = [];
    const shipmentRows: InValue[][] = [];
    const caseRows: InValue[][] = [];
    const containmentRows: InValue[][] = [];
    // The batch a unit received at `at` came in, made (with its maker's lot item) the first time it is needed.
    const batchFor = (partType: "tweeter" | "midrange" | "bass", at: number) => {
      const received = `${day(Math.max(at, START)).slice(0, 7)}-01`;
      const code = batchCode(partType, received, 1);
      let id = batches.get(code);
      if (!id) {
        const maker = MAKERS[partType];
        const lot = `${maker.lotPrefix}${received.slice(2, 4)}${received.slice(5, 7)}-${pad(1 + rng.int(99), 2)}`;
        id = randomId(rng);
        batches.set(code, id);
        const at0 = Date.parse(received);
        item(randomId(rng), "maker_lot", makerLotIdentity(maker.name, lot), "received", at0, { part: partType, attrs: { maker: maker.name, lot } });
        item(randomId(rng), "unit_batch", code, "received", at0, { part: partType, attrs: { maker: maker.name, partNumber: maker.partNumber, lot, receivedOn: received } });
        unitBatchRows.push([id, code, partType, maker.partNumber, maker.name, lot, received, benchEvent, Math.round(at0)]);
      }
      return id;
    };
    const item = (id: string, kind: string, identity: string, state: string, at: number, o: { model?: string | null; finish?: string | null; part?: string | null; dealer?: string | null; attrs?: object } = {}) => {
      items.push([id, kind, identity, o.model ?? null, o.finish ?? null, o.part ?? null, state, o.dealer ?? null, JSON.stringify(o.attrs ?? {}), Math.round(at)]);
      parentCopy.set(id, [kind, identity]);
      return id;
    };
    const link = (parent: string, child: string, position: string, at: number, shared = 0, endedAt: number | null = null) => {
      const [parentKind, parentIdentity] = parentCopy.get(parent)!;
      links.push([parent, parentKind, parentIdentity, child, position, shared, Math.round(at), endedAt === null ? null : Math.round(endedAt), benchEvent, endedAt === null ? null : benchEvent]);
    };
    const yyyy = START_YEAR + year;
    const yearStart = Date.UTC(yyyy, 0, 1);

    // This year's supplier lots, bought in January.
    const lotPool = LOT_POSITIONS.map((lp) =>
      Array.from({ length: LOTS_PER_POSITION_PER_YEAR }, (_, k) =>
        item(randomId(rng), "component_lot", `LOT-${yyyy}-${lp.position}-${pad(k + 1, 3)}`, "in_stock", yearStart + rng.int(20) * DAY, {
          part: lp.partType,
          attrs: { supplierCode: `SUP-${pad(1 + rng.int(9), 2)}`, lot: `${String(yyyy).slice(2)}${pad(rng.int(10_000), 4)}${rng.pick(["A", "B", "C"])}`, value: rng.pick(lp.values), quantity: 500 + 100 * rng.int(20) },
        }),
      ),
    );

    for (let p = year * PAIRS_PER_YEAR; p < (year + 1) * PAIRS_PER_YEAR; p++) {
      const done = pairTime[p]!;
      if (p === BIG_LOT_FIRST_PAIR) {
        bigLotIdentity = `LOT-${yyyy}-C1-BULK`;
        bigLotId = item(randomId(rng), "component_lot", bigLotIdentity, "in_stock", done - 30 * DAY, {
          part: "capacitor",
          attrs: { supplierCode: "SUP-04", value: "3.3 µF", quantity: 6000 },
        });
      }
      const inBigLot = p >= BIG_LOT_FIRST_PAIR && p < BIG_LOT_FIRST_PAIR + BIG_LOT_CROSSOVERS / 2;

      if (p % CARTONS_PER_SHIPMENT === 0) {
        const s = p / CARTONS_PER_SHIPMENT;
        const dealer = rng.pick(dealerIds);
        const shipped = shipTime(s);
        shipmentId = item(randomId(rng), "shipment", serial("shipment", dealerCode.get(dealer)!, yearOf(shipped)), "shipped", done, { dealer });
        shipmentRows.push([shipmentId, dealer, day(shipped), "Parcel carrier", s10Tracking(rng), benchEvent]);
      }

      // Both cabinets of a pair are faced from one flitch (bookmatched), so a new flitch starts per pair if needed.
      if (flitch.nextLeaf + 8 > LEAVES_PER_FLITCH) {
        const finish = rng.pick(veneers);
        flitch = { code: serial("flitch", finish.code, yearOf(done - 40 * DAY)), finishId: finish.id, nextLeaf: 0 };
        const flitchId = item(randomId(rng), "flitch", flitch.code, "cut", done - 40 * DAY, { finish: finish.id, attrs: { leaves: LEAVES_PER_FLITCH, species: finish.detail } });
        // The yard's log number: year felled, log and which flitch of the log.
        flitchRows.push([flitchId, finish.id, `${String(yyyy - 1).slice(2)}-${pad(1 + rng.int(9999), 4)}-${"ABCDEF"[rng.int(6)]}`, "Timber yard", day(done - 40 * DAY), 0.6, LEAVES_PER_FLITCH, benchEvent]);
      }

      const pairId = item(randomId(rng), "pair", serial("pair", modelRow.code, yyyy), "shipped", done - 14 * DAY, {
        model: modelId, finish: flitch.finishId, attrs: { gtin: modelRow.pairGtin },
      });
      pairIds.push(pairId);

      for (const side of ["L", "R"] as const) {
        const speaker = item(randomId(rng), "speaker", serial("speaker", modelRow.code, yyyy), "fitted", done - 14 * DAY, { model: modelId, attrs: { side } });
        link(pairId, speaker, side, done);

        const cabinet = item(randomId(rng), "cabinet", serial("cabinet", modelRow.code, yyyy), "fitted", done - 30 * DAY, { model: modelId, finish: flitch.finishId });
        for (let l = 1; l <= 4; l++) {
          // Leaves are cut from the flitch: the flitch is named in the leaf's identity and attrs.
          const leafNo = ++flitch.nextLeaf;
          const leaf = item(randomId(rng), "leaf", leafIdentity(flitch.code, leafNo), "fitted", done - 40 * DAY, {
            finish: flitch.finishId, attrs: { flitch: flitch.code, leaf: leafNo, lengthMm: 1090 + rng.int(30), widthMm: 118 + rng.int(12), flipped: leafNo % 2 === 0 },
          });
          link(cabinet, leaf, `L${l}`, done - 25 * DAY);
        }

        const crossover = item(randomId(rng), "crossover", serial("crossover", modelRow.code, yyyy), "fitted", done - 8 * DAY, { model: modelId });
        LOT_POSITIONS.forEach((lp, i) => {
          const lot = inBigLot && lp.position === "C1" ? bigLotId : rng.pick(lotPool[i]!);
          link(crossover, lot, lp.position, done - 6 * DAY, 1);
        });

        const fitted: Record<string, string> = { CAB: cabinet, XO: crossover };
        const rowOf: Record<string, InValue[]> = {};
        for (const du of DRIVE_UNITS) {
          const n = ++driveUnitSeq;
          const received = done - 20 * DAY;
          fitted[du.position] = item(randomId(rng), "drive_unit", serial("drive_unit", PART_TYPE_CODES[du.partType], yearOf(received)), "fitted", received, {
            part: du.partType, attrs: { supplierCode: `SUP-${pad(1 + rng.int(9), 2)}` },
          });
          batchUnitRows.push([fitted[du.position]!, batchFor(du.partType, received), MAKERS[du.partType].serial(rng, n)]);
          rowOf[du.position] = items.at(-1)!;
        }

        // A repair: the failed unit's link is ended (as the service desk would) and its
        // replacement gets a new open link at the same position.
        let repaired: { position: string; at: number } | null = null;
        if (rng.float() < REPAIR_RATE && END - done > 90 * DAY) {
          const du = rng.pick(DRIVE_UNITS);
          repaired = { position: du.position, at: done + 60 * DAY + rng.float() * (END - done - 90 * DAY) };
          const old = fitted[du.position]!;
          rowOf[du.position]![ITEM_COLS.indexOf("state")] = "failed";
          link(speaker, old, du.position, done - 2 * DAY, 0, repaired.at);
          const n = ++driveUnitSeq;
          const received = repaired.at - 2 * DAY;
          fitted[du.position] = item(randomId(rng), "drive_unit", serial("drive_unit", PART_TYPE_CODES[du.partType], yearOf(received)), "fitted", received, {
            part: du.partType, attrs: { supplierCode: `SUP-${pad(1 + rng.int(9), 2)}`, replaces: old },
          });
          batchUnitRows.push([fitted[du.position]!, batchFor(du.partType, received), MAKERS[du.partType].serial(rng, n)]);
          // The repair came in as a service case, closed when the speaker went back.
          const opened = repaired.at - 20 * DAY;
          const code = caseCode(day(opened), nextInMonth(`RT${day(opened).slice(0, 7)}`));
          caseRows.push([randomId(rng), code, speaker, pairId, "owner", rng.pick(owners).id, day(opened), "Distortion from one drive unit at moderate level", "closed", Math.round(opened), benchEvent]);
          repairs++;
        }
        for (const position of SPEAKER_POSITIONS) {
          link(speaker, fitted[position]!, position, repaired?.position === position ? repaired.at : done - 2 * DAY);
        }
      }

      const carton = item(randomId(rng), "carton", serial("carton", modelRow.code, yearOf(done + DAY)), "shipped", done + DAY);
      link(carton, pairId, "P", done + DAY);
      link(shipmentId, carton, pad((p % CARTONS_PER_SHIPMENT) + 1, 2), shipTime(Math.floor(p / CARTONS_PER_SHIPMENT)));
    }

    // A few containments a year, on this year's component lots.
    for (let c = 0; c < CONTAINMENTS_PER_YEAR; c++) {
      const lot = rng.pick(rng.pick(lotPool));
      const raised = yearStart + (60 + rng.int(270)) * DAY;
      const code = containmentCode(day(raised), nextInMonth(`CN${day(raised).slice(0, 7)}`));
      containmentRows.push([randomId(rng), code, lot, parentCopy.get(lot)![1], "Capacitance out of tolerance on incoming sample", "major", Math.round(raised), benchUser, benchEvent]);
    }

    // One write transaction a year: items first, so the other rows' foreign keys find them. The
    // search index's triggers fill it row by row, as they would for the app's own writes.
    await client.batch(
      [
        ...multiRowInserts("items", ITEM_COLS, items),
        ...multiRowInserts("links", LINK_COLS, links),
        ...multiRowInserts("unit_batches", ["id", "code", "part_type", "part_number", "maker", "lot", "received_on", "event_id", "created_at"], unitBatchRows),
        ...multiRowInserts("batch_units", ["item_id", "batch_id", "maker_serial"], batchUnitRows),
        ...multiRowInserts("flitches", ["item_id", "finish_id", "log_reference", "supplier", "received_on", "leaf_thickness_mm", "leaf_count", "event_id"], flitchRows),
        ...multiRowInserts("shipment_details", ["item_id", "dealer_id", "shipped_on", "carrier", "tracking", "event_id"], shipmentRows),
        ...multiRowInserts("service_cases", ["id", "code", "item_id", "pair_id", "returned_by", "owner_id", "received_on", "symptom", "state", "opened_at", "event_id"], caseRows),
        ...multiRowInserts("containments", ["id", "code", "target_item_id", "target_label", "reason", "severity", "raised_at", "raised_by", "event_id"], containmentRows),
      ],
      "write",
    );
    makerSerials += batchUnitRows.length;
    serviceCases += caseRows.length;
    containments += containmentRows.length;
    itemCount += items.length;
    linkCount += links.length;
    const elapsed = (performance.now() - t0) / 1000;
    console.log(
      `  ${yyyy}: +${items.length.toLocaleString("en")} items, +${links.length.toLocaleString("en")} links` +
        ` (${linkCount.toLocaleString("en")} links so far) in ${((performance.now() - ty) / 1000).toFixed(1)} s, ${elapsed.toFixed(1)} s total`,
    );
  }

  const counted = await client.execute("SELECT (SELECT count(*) FROM links) AS links, (SELECT count(*) FROM items) AS items");
  const links = Number(counted.rows[0]!.links);
  const itemsInDb = Number(counted.rows[0]!.items);
  if (links !== linkCount || itemsInDb !== itemCount) throw new Error(`bench: wrote ${linkCount} links / ${itemCount} items but counted ${links} / ${itemsInDb}`);
  if (links < MIN_LINKS) throw new Error(`bench: only ${links} links; the register must hold at least ${MIN_LINKS}`);
  // The holdings index that fit() keeps row by row, built here in one go from the open links with
  // the same statement as migration 0007 (the bulk insert bypasses fit()).
  const th = performance.now();
  await client.execute(readFileSync(resolve("db/migrations/0007_holdings_backfill.sql"), "utf8"));
  const held = Number((await client.execute("SELECT count(*) AS n FROM holdings")).rows[0]!.n);
  console.log(`  holdings: ${held.toLocaleString("en")} rows in ${((performance.now() - th) / 1000).toFixed(1)} s`);
  // Leave a plain file behind, so the measuring client starts like the app's would.
  await client.execute("PRAGMA wal_checkpoint(TRUNCATE)");
  client.close();
  return {
    links, items: itemsInDb, dealers: allDealers.length, owners: owners.length, makerSerials, serviceCases, containments,
    pairIds, bigLotId, bigLotIdentity, repairs, seconds: (performance.now() - t0) / 1000,
  };
}

