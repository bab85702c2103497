import "server-only";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { firstHolds } from "@/lib/containments/holds";
import { normaliseScan, parseSerial } from "@/lib/serials/format";
import { isoDay } from "./dates";

const dateOf = (ms: number | null | undefined) => (ms === null || ms === undefined ? null : new Date(Number(ms)));

export interface ReadyPair {
  identity: string;
  state: string;
  model: string;
  modelCode: string;
  finish: string | null;
  /** When it passed its final test (the newest move into its present state). */
  testedAt: Date | null;
  /** The open containment holding it (it is not offered for packing), or null. */
  heldBy: string | null;
}

/** Pairs that passed their final test and wait to be packed, longest waiting first. */
export async function readyToPack(db: DbOrTx): Promise<ReadyPair[]> {
  const rows = await db.all<{ id: string; identity: string; state: string; model: string | null; model_code: string | null; finish: string | null; tested_at: number | null }>(sql`
    SELECT p.id, p.identity, p.state, m.name AS model, m.code AS model_code, f.name AS finish,
           (SELECT max(e.at) FROM events e
             WHERE e.subject_kind = 'item' AND e.subject_id = p.id AND e.type = 'item.state_changed'
               AND json_extract(e.data, '$.to') = p.state) AS tested_at
    FROM items p
    LEFT JOIN models m ON m.id = p.model_id
    LEFT JOIN finishes f ON f.id = p.finish_id
    WHERE p.kind = 'pair' AND p.state IN ('ready_to_pack', 'tested')
    ORDER BY tested_at, p.identity`);
  const held = await firstHolds(db, rows.map((r) => r.id));
  return rows.map((r) => ({ identity: r.identity, state: r.state, model: r.model ?? "", modelCode: r.model_code ?? "", finish: r.finish, testedAt: dateOf(r.tested_at), heldBy: held.get(r.id)?.code ?? null }));
}

export interface WaitingCarton {
  id: string;
  carton: string;
  pair: string | null;
  model: string;
  modelCode: string;
  finish: string | null;
  location: string | null;
  packedOn: string;
  /** Its SSCC (18 digits), or null for a carton from before SSCCs. */
  sscc: string | null;
  /** The open containment holding its pair (it cannot ship), or null. */
  heldBy: string | null;
}

/** Packed cartons not yet in a shipment, with where they are stored, oldest first. */
export async function waitingToShip(db: DbOrTx): Promise<WaitingCarton[]> {
  const rows = await db.all<{ id: string; carton: string; pair: string | null; model: string | null; model_code: string | null; finish: string | null; location: string | null; packed_on: string | null; created_at: number; sscc: string | null }>(sql`
    SELECT c.id, c.identity AS carton, p.identity AS pair, m.name AS model, m.code AS model_code, f.name AS finish,
           (SELECT cs.sscc FROM carton_ssccs cs WHERE cs.carton_id = c.id) AS sscc,
           (SELECT cl.location FROM carton_locations cl WHERE cl.carton_id = c.id ORDER BY cl.id DESC LIMIT 1) AS location,
           json_extract(c.attrs, '$.packedOn') AS packed_on, c.created_at
    FROM items c
    LEFT JOIN links pl ON pl.parent_id = c.id AND pl.position = 'PAIR' AND pl.ended_at IS NULL
    LEFT JOIN items p ON p.id = pl.child_id
    LEFT JOIN models m ON m.id = c.model_id
    LEFT JOIN finishes f ON f.id = p.finish_id
    WHERE c.kind = 'carton' AND c.state = 'packed'
      AND NOT EXISTS (SELECT 1 FROM links sl WHERE sl.child_id = c.id AND sl.ended_at IS NULL AND sl.parent_kind = 'shipment')
    ORDER BY c.created_at, c.identity`);
  const held = await firstHolds(db, rows.map((r) => r.id));
  return rows.map((r) => ({
    id: r.id,
    carton: r.carton,
    pair: r.pair,
    model: r.model ?? "",
    modelCode: r.model_code ?? "",
    finish: r.finish,
    location: r.location,
    packedOn: r.packed_on ?? isoDay(new Date(Number(r.created_at))),
    sscc: r.sscc,
    heldBy: held.get(r.id)?.code ?? null,
  }));
}

export interface ShippedCarton {
  shipment: string;
  carton: string;
  pair: string | null;
  dealer: string;
  carrier: string | null;
  tracking: string | null;
}

/**
 * Cartons in shipments that left on `day` (YYYY-MM-DD, the workshop's calendar): the day the packer
 * recorded, or, for a shipment without that record (the demo history), the day it was made in the
 * workshop's time zone, so the list agrees with the shipments the event log shows that day.
 */
export async function shippedOn(db: DbOrTx, day: string): Promise<ShippedCarton[]> {
  // Every shipment records its day (the workshop's calendar day it left) in shipment_details.
  const rows = await db.all<{ shipment: string; carton: string; pair: string | null; dealer: string | null; carrier: string | null; tracking: string | null }>(sql`
    SELECT s.identity AS shipment, c.identity AS carton, p.identity AS pair, d.name AS dealer, sd.carrier, sd.tracking
    FROM shipment_details sd
    -- CROSS JOIN keeps this order (SQLite's rule): from the day's few shipments down to their
    -- cartons; left to itself the planner began from every carton ever packed (1 s at 40,000).
    CROSS JOIN items s ON s.id = sd.item_id
    JOIN dealers d ON d.id = sd.dealer_id
    CROSS JOIN links cl ON cl.parent_id = s.id AND cl.ended_at IS NULL
    JOIN items c ON c.id = cl.child_id AND c.kind = 'carton'
    LEFT JOIN links pl ON pl.parent_id = c.id AND pl.position = 'PAIR' AND pl.ended_at IS NULL
    LEFT JOIN items p ON p.id = pl.child_id
    WHERE sd.shipped_on = ${day}
    ORDER BY s.created_at, CAST(cl.position AS INTEGER)`);
  return rows.map((r) => ({ shipment: r.shipment, carton: r.carton, pair: r.pair, dealer: r.dealer ?? "", carrier: r.carrier, tracking: r.tracking }));
}

export interface PairForPacking {
  id: string;
  identity: string;
  state: string;
  modelId: string | null;
  model: string;
  modelCode: string;
  finish: string | null;
  left: string | null;
  right: string | null;
  carton: string | null;
  /** The carton's SSCC, 18 digits, when packed. */
  sscc: string | null;
  location: string | null;
  hasCertificate: boolean;
  /** How many times its certificate has been printed: after the first, a print is a copy. */
  certificatePrints: number;
  /** The newest final test on record passed (demo pairs tested before the records began have none). */
  finalTestPassed: boolean;
}

/** What the packing page shows of a pair, by its serial as scanned or typed; null when there is no such pair. */
export async function pairForPacking(db: DbOrTx, text: string): Promise<PairForPacking | null> {
  const t = normaliseScan(text);
  const parsed = parseSerial(t);
  const identity = parsed?.valid ? parsed.canonical : t;
  const [row] = await db.all<{
    id: string; identity: string; state: string; model_id: string | null; model: string | null; model_code: string | null; finish: string | null;
    left: string | null; right: string | null; carton_id: string | null; carton: string | null; sscc: string | null; certificate: string | null; passed: number | null; prints: number;
  }>(sql`
    SELECT p.id, p.identity, p.state, p.model_id, m.name AS model, m.code AS model_code, f.name AS finish,
           (SELECT s.identity FROM links l JOIN items s ON s.id = l.child_id WHERE l.parent_id = p.id AND l.position = 'L' AND l.ended_at IS NULL) AS "left",
           (SELECT s.identity FROM links l JOIN items s ON s.id = l.child_id WHERE l.parent_id = p.id AND l.position = 'R' AND l.ended_at IS NULL) AS "right",
           c.id AS carton_id, c.identity AS carton, (SELECT cs.sscc FROM carton_ssccs cs WHERE cs.carton_id = c.id) AS sscc,
           (SELECT id FROM certificates WHERE pair_id = p.id) AS certificate,
           (SELECT pass FROM final_tests WHERE pair_id = p.id ORDER BY id DESC LIMIT 1) AS passed,
           (SELECT count(*) FROM events e WHERE e.subject_kind = 'item' AND e.subject_id = p.id AND e.type = 'certificate.printed') AS prints
    FROM items p
    LEFT JOIN models m ON m.id = p.model_id
    LEFT JOIN finishes f ON f.id = p.finish_id
    LEFT JOIN links cl ON cl.child_id = p.id AND cl.ended_at IS NULL AND cl.parent_kind = 'carton'
    LEFT JOIN items c ON c.id = cl.parent_id
    WHERE p.kind = 'pair' AND p.identity = ${identity}`);
  if (!row) return null;
  const [loc] = row.carton_id
    ? await db.all<{ location: string }>(sql`SELECT location FROM carton_locations WHERE carton_id = ${row.carton_id} ORDER BY id DESC LIMIT 1`)
    : [];
  return {
    id: row.id,
    identity: row.identity,
    state: row.state,
    modelId: row.model_id,
    model: row.model ?? "",
    modelCode: row.model_code ?? "",
    finish: row.finish,
    left: row.left,
    right: row.right,
    carton: row.carton,
    sscc: row.sscc,
    location: loc?.location ?? null,
    hasCertificate: row.certificate !== null,
    certificatePrints: Number(row.prints),
    finalTestPassed: Number(row.passed) === 1,
  };
}

/** Storage places used lately, most recent first: suggestions for the location field. */
export async function knownLocations(db: DbOrTx, limit = 30): Promise<string[]> {
  const rows = await db.all<{ location: string }>(sql`
    SELECT location FROM carton_locations GROUP BY location ORDER BY max(id) DESC LIMIT ${limit}`);
  return rows.map((r) => r.location);
}

export interface ShipmentFacts {
  id: string;
  identity: string;
  dealer: { code: string; name: string; city: string } | null;
  /** YYYY-MM-DD: the day it left as the packer recorded it; for history without that record, the day it was made. */
  shippedOn: string;
}

/** Shipments with their dealer and the day they left, in the order asked. */
export async function shipmentFacts(db: DbOrTx, shipmentIds: string[]): Promise<ShipmentFacts[]> {
  if (shipmentIds.length === 0) return [];
  const rows = await db.all<{ id: string; identity: string; code: string | null; name: string | null; city: string | null; shipped_on: string | null; created_at: number }>(sql`
    SELECT s.id, s.identity, d.code, d.name, d.city, sd.shipped_on, s.created_at
    FROM items s
    LEFT JOIN shipment_details sd ON sd.item_id = s.id
    LEFT JOIN dealers d ON d.id = coalesce(sd.dealer_id, s.dealer_id)
    WHERE s.kind = 'shipment' AND s.id IN (SELECT value FROM json_each(${JSON.stringify(shipmentIds)}))`);
  const byId = new Map(rows.map((r) => [r.id, r]));
  return shipmentIds
    .map((id) => byId.get(id))
    .filter((r) => r !== undefined)
    .map((r) => ({
      id: r.id,
      identity: r.identity,
      dealer: r.code && r.name ? { code: r.code, name: r.name, city: r.city ?? "" } : null,
      shippedOn: r.shipped_on ?? isoDay(new Date(Number(r.created_at))),
    }));
}
