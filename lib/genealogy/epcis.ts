import "server-only";
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { cartonSsccs, crossoverParts, events, items, links, models, processSpecs, routeStarts, type ItemKind } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import type { StepSpec } from "@/lib/route/types";
import { checkGs1Settings, digitalLink, isValidSscc } from "@/lib/gs1";
import { traceBackward } from "./trace";

/**
 * A serial's history as a GS1 EPCIS 2.0 JSON-LD document (EPCIS 2.0 §7 / CBV 2.0 vocabulary).
 * Fits and removals become AggregationEvents (a part stays identifiable and removable inside its
 * parent); everything else an ObjectEvent. The readings the register records (a route step's
 * readings, a Thiele–Small set, a crossover board's part readings, the final pair test) become
 * sensor reports (EPCIS 2.0 §7.3.7). Facts EPCIS has no field for go into extension fields
 * of our own namespace "tw", declared in @context so a JSON-LD reader can expand them.
 */

export const EPCIS_CONTEXT = "https://ref.gs1.org/standards/epcis/2.0.0/epcis-context.jsonld";
const TZ = "+00:00"; // event times are written in UTC

/** One row of the event log, as much of it as the export needs. */
export interface EpcisSourceEvent {
  id: number;
  at: Date;
  station: string;
  type: string;
  subjectId: string;
  data: Record<string, unknown>;
  reason: string | null;
  correctsId: number | null;
}

/** What naming an item needs: its kind and identity, and for a pair or carton its model's GTIN. */
export interface EpcisItem {
  id: string;
  kind: ItemKind;
  identity: string;
  pairGtin: string | null;
  /** A carton's SSCC (18 digits): it is then named by it, `/00/{sscc}`. */
  sscc?: string | null;
  /** The item's own facts: a lot's GTIN and lot number, when its supplier gave them. */
  attrs?: Record<string, unknown>;
}

type Ext = { [key: `tw:${string}`]: unknown };

export type EpcisErrorDeclaration = {
  declarationTime: string;
  reason: "did_not_occur" | "incorrect_data";
  correctiveEventIDs?: string[];
} & Ext;

export interface EpcisSensorReport {
  type: string;
  value?: number;
  stringValue?: string;
  booleanValue?: boolean;
  uom?: string;
  [key: `tw:${string}`]: unknown;
}

export type EpcisEvent = {
  type: "ObjectEvent" | "AggregationEvent";
  eventID: string;
  eventTime: string;
  eventTimeZoneOffset: string;
  action: "ADD" | "OBSERVE" | "DELETE";
  epcList?: string[];
  parentID?: string;
  childEPCs?: string[];
  bizStep?: string;
  disposition?: string;
  readPoint?: { id: string };
  bizLocation?: { id: string };
  sensorElementList?: { sensorReport: EpcisSensorReport[] }[];
  quantityList?: { epcClass: string; quantity?: number; uom?: string }[];
  sourceList?: { type: string; source: string }[];
  destinationList?: { type: string; destination: string }[];
  bizTransactionList?: { type?: string; bizTransaction: string }[];
  errorDeclaration?: EpcisErrorDeclaration;
} & Ext;

export interface EpcisDocument {
  "@context": [string, { tw: string }];
  type: "EPCISDocument";
  schemaVersion: "2.0";
  creationDate: string;
  epcisBody: { eventList: EpcisEvent[] };
}

export interface EpcisOptions {
  baseUri: string;
}

const trimBase = (baseUri: string) => baseUri.replace(/\/+$/, "");

/**
 * A pair or carton with its model's GTIN is named by a GS1 Digital Link URI (GTIN + serial, the
 * same key its carton label carries); everything else by a URI under our own address.
 */
export function itemUri(item: Pick<EpcisItem, "kind" | "identity" | "pairGtin"> & { sscc?: string | null }, baseUri: string): string {
  if (item.kind === "carton" && item.sscc && isValidSscc(item.sscc)) return digitalLink({ sscc: item.sscc });
  if ((item.kind === "pair" || item.kind === "carton") && item.pairGtin && /^\d{14}$/.test(item.pairGtin)) {
    return `https://id.gs1.org/01/${item.pairGtin}/21/${encodeURIComponent(item.identity)}`;
  }
  return identityUri(item.identity, baseUri);
}

const identityUri = (identity: string, baseUri: string) => `${trimBase(baseUri)}/id/${encodeURIComponent(identity)}`;
export const eventUri = (id: number, baseUri: string) => `${trimBase(baseUri)}/events/${id}`;
const stationUri = (station: string, baseUri: string) => `${trimBase(baseUri)}/stations/${encodeURIComponent(station)}`;

/**
 * UN/CEFACT Recommendation 20 codes (the schema wants 2–3 capitals or digits) and, where the
 * quantity is one of GS1's measurement types, that type. Units outside the table keep their
 * own text in tw:unit; dB and % have no GS1 quantity type and get our own type URI.
 */
const UNITS: Record<string, { uom: string; type?: string }> = {
  Hz: { uom: "HTZ", type: "gs1:Frequency" },
  kHz: { uom: "KHZ", type: "gs1:Frequency" },
  ohm: { uom: "OHM", type: "gs1:Resistance" },
  "Ω": { uom: "OHM", type: "gs1:Resistance" },
  F: { uom: "FAR", type: "gs1:Capacitance" },
  uF: { uom: "4O", type: "gs1:Capacitance" },
  "µF": { uom: "4O", type: "gs1:Capacitance" },
  nF: { uom: "C41", type: "gs1:Capacitance" },
  pF: { uom: "4T", type: "gs1:Capacitance" },
  H: { uom: "81", type: "gs1:Inductance" },
  mH: { uom: "C14", type: "gs1:Inductance" },
  uH: { uom: "B90", type: "gs1:Inductance" },
  "µH": { uom: "B90", type: "gs1:Inductance" },
  V: { uom: "VLT", type: "gs1:Voltage" },
  W: { uom: "WTT", type: "gs1:Power" },
  mm: { uom: "MMT", type: "gs1:Length" },
  cm: { uom: "CMT", type: "gs1:Length" },
  m: { uom: "MTR", type: "gs1:Length" },
  g: { uom: "GRM", type: "gs1:Mass" },
  kg: { uom: "KGM", type: "gs1:Mass" },
  L: { uom: "LTR", type: "gs1:Volume" },
  N: { uom: "NEW", type: "gs1:Force" },
  kPa: { uom: "KPA", type: "gs1:Pressure" },
  bar: { uom: "BAR", type: "gs1:Pressure" },
  "°C": { uom: "CEL", type: "gs1:Temperature" },
  degC: { uom: "CEL", type: "gs1:Temperature" },
  s: { uom: "SEC", type: "gs1:Time" },
  min: { uom: "MIN", type: "gs1:Time" },
  h: { uom: "HUR", type: "gs1:Time" },
  dB: { uom: "2N" },
  "%": { uom: "P1" },
};

/** One reading as the register recorded it, with its unit as the workshop writes it. */
export interface EpcisReading {
  /** The reading's key: "platenC", "fs", "C1". */
  name: string;
  value: number | boolean | string;
  /** "°C", "Hz", "F"…; null for a check or a dimensionless figure. */
  unit: string | null;
  /** Words for it: "Platen temperature". */
  label?: string;
  /** A GS1 measurement type the unit alone does not give (Qts has no unit: gs1:Dimensionless). */
  type?: string;
  /** Facts of our own beside the value: a crossover part's nominal value and tolerance. */
  details?: Record<string, unknown>;
}

function sensorReport(reading: EpcisReading, baseUri: string): EpcisSensorReport {
  const known = reading.unit ? UNITS[reading.unit] : undefined;
  const report: EpcisSensorReport = {
    type: reading.type ?? known?.type ?? `${trimBase(baseUri)}/readings/${encodeURIComponent(reading.name)}`,
    "tw:name": reading.name,
  };
  const v = reading.value;
  if (typeof v === "number" && Number.isFinite(v)) report.value = v;
  else if (typeof v === "boolean") report.booleanValue = v;
  else report.stringValue = String(v);
  if (known) report.uom = known.uom;
  else if (reading.unit) report["tw:unit"] = reading.unit;
  if (reading.label) report["tw:label"] = reading.label;
  if (reading.details && Object.keys(reading.details).length) report["tw:details"] = reading.details;
  return report;
}

/** A crossover board's part as measured when it was built (crossover_parts). */
export interface CrossoverPartReading {
  position: string;
  partNumber: string;
  nominal: number;
  unit: string;
  tolerance: string;
  reading: number | null;
}

/** What turning events into readings needs beyond the event itself. */
export interface ReadingContext {
  /** A route's steps (with each reading's label and unit) by the serial of the pair, or lone lacquer cabinet, it ran under. */
  routeSteps?: ReadonlyMap<string, readonly StepSpec[]>;
  /** A board's part readings by the id of the "crossover.built" event that recorded them. */
  crossoverParts?: ReadonlyMap<number, readonly CrossoverPartReading[]>;
  /** Items events name by serial rather than id (the carton a pair.shipped event names). */
  itemsByIdentity?: ReadonlyMap<string, EpcisItem>;
  /** How many things a lot or batch went into, ever, by its item id: its quantity at receiving. */
  lotQuantities?: ReadonlyMap<string, number>;
  /** The workshop's own URI as a party (a GLN Digital Link when TWINLEAF_GLN is set). */
  workshopUri?: string;
}

/** Thiele–Small fields as unit.ts_measured carries them, with their units (docs/REFERENCES.md, § Loudspeaker parameters). */
const TS_FIELDS: { key: string; name: string; unit: string | null; label: string; type?: string }[] = [
  { key: "fsHz", name: "fs", unit: "Hz", label: "Resonance frequency Fs" },
  { key: "qts", name: "qts", unit: null, label: "Total Q, Qts", type: "gs1:Dimensionless" },
  { key: "qes", name: "qes", unit: null, label: "Electrical Q, Qes", type: "gs1:Dimensionless" },
  { key: "qms", name: "qms", unit: null, label: "Mechanical Q, Qms", type: "gs1:Dimensionless" },
  { key: "reOhm", name: "re", unit: "Ω", label: "DC resistance Re" },
  { key: "vasL", name: "vas", unit: "L", label: "Equivalent volume Vas" },
  { key: "sensitivityDb", name: "sensitivity", unit: "dB", label: "Sensitivity" },
];

const isFigure = (v: unknown): v is number | boolean => (typeof v === "number" && Number.isFinite(v)) || typeof v === "boolean";

/**
 * The readings an event records, in the order they were taken: a route step's readings (labelled
 * and with units from the route version the pair ran under), a Thiele–Small set, a crossover
 * board's measured parts, the final pair test's largest difference. Empty for any other event.
 */
export function readingsOf(e: Pick<EpcisSourceEvent, "id" | "type" | "data">, ctx: ReadingContext = {}): EpcisReading[] {
  const d = e.data ?? {};
  switch (e.type) {
    // A correction carries the record's readings as they should have read (lib/route/corrections.ts).
    case "route.step_corrected":
    case "route.step_recorded": {
      const values = d.readings && typeof d.readings === "object" ? (d.readings as Record<string, unknown>) : {};
      const step = typeof d.pair === "string" ? ctx.routeSteps?.get(d.pair)?.find((s) => s.seq === d.seq) : undefined;
      return Object.entries(values)
        .filter((entry): entry is [string, number | boolean] => isFigure(entry[1]))
        .map(([key, value]) => {
          const spec = step?.readings.find((r) => r.key === key);
          return { name: key, value, unit: spec?.unit ?? null, ...(spec ? { label: spec.label } : {}) };
        });
    }
    case "unit.ts_measured":
      return TS_FIELDS.filter((f) => isFigure(d[f.key])).map((f) => ({
        name: f.name,
        value: d[f.key] as number,
        unit: f.unit,
        label: f.label,
        ...(f.type ? { type: f.type } : {}),
      }));
    case "crossover.built":
      return (ctx.crossoverParts?.get(e.id) ?? [])
        .filter((p) => p.reading !== null)
        .map((p) => ({ name: p.position, value: p.reading!, unit: p.unit, label: p.partNumber, details: { nominal: p.nominal, tolerance: p.tolerance } }));
    case "pair.final_tested":
      return typeof d.maxDiffDb === "number"
        ? [{ name: "maxDiffDb", value: d.maxDiffDb, unit: "dB", label: "Largest left/right difference in one-third-octave bands", details: { ...(typeof d.worstBand === "string" ? { band: d.worstBand } : {}), ...(typeof d.limitDb === "number" ? { limitDb: d.limitDb } : {}) } }]
        : [];
    default:
      return [];
  }
}

/** Measuring in the lab, or a hand check on the route, is CBV "inspecting"; a production step is not. */
const INSPECTING = new Set(["unit.ts_measured", "crossover.built", "pair.final_tested"]);

/** CBV 2.0 dispositions for the register's states where one clearly says the same thing. */
const STATE_DISPOSITION: Record<string, string> = {
  shipped: "in_transit",
  returned: "returned",
  scrapped: "destroyed",
};

const rest = (data: Record<string, unknown>, drop: string[]) => {
  const out = Object.fromEntries(Object.entries(data).filter(([k]) => !drop.includes(k)));
  return Object.keys(out).length ? out : undefined;
};

/** Maps one register event to its EPCIS event (without any error declaration). */
function toEpcisEvent(e: EpcisSourceEvent, itemsById: ReadonlyMap<string, EpcisItem>, baseUri: string, ctx: ReadingContext): EpcisEvent {
  const d = e.data ?? {};
  const str = (k: string) => (typeof d[k] === "string" ? (d[k] as string) : null);
  const uriOf = (id: string | null, identity: string | null) => {
    const item = id ? itemsById.get(id) : undefined;
    if (item) return itemUri(item, baseUri);
    return identityUri(identity ?? id ?? "unknown", baseUri);
  };
  const subject = uriOf(e.subjectId, str("identity") ?? str("child"));
  const where = { id: stationUri(e.station, baseUri) };
  const base = {
    eventID: eventUri(e.id, baseUri),
    eventTime: e.at.toISOString(),
    eventTimeZoneOffset: TZ,
  };
  const tail: Ext = { "tw:eventType": e.type };
  if (e.reason) tail["tw:reason"] = e.reason;
  if (e.correctsId !== null) tail["tw:corrects"] = eventUri(e.correctsId, baseUri);

  const supplyChain = supplyChainEvent(e, itemsById, baseUri, ctx, { base, where, subject, tail, uriOf });
  if (supplyChain) return supplyChain;

  const readings = readingsOf(e, ctx);
  if (readings.length) {
    const details = rest(d, ["identity", "readings", ...TS_FIELDS.map((f) => f.key)]);
    return {
      type: "ObjectEvent",
      ...base,
      action: "OBSERVE",
      epcList: [subject],
      bizStep: readingBizStep(e),
      readPoint: where,
      bizLocation: where,
      sensorElementList: [{ sensorReport: readings.map((r) => sensorReport(r, baseUri)) }],
      ...(details ? { "tw:details": details } : {}),
      ...tail,
    };
  }

  switch (e.type) {
    case "link.fitted":
    case "link.removed": {
      const fitted = e.type === "link.fitted";
      return {
        type: "AggregationEvent",
        ...base,
        action: fitted ? "ADD" : "DELETE",
        parentID: uriOf(str("parentId"), str("parent")),
        childEPCs: [subject],
        // CBV 2.0 bizSteps: removal at the service desk is part of a repair; elsewhere a single
        // part taken out of its assembly is "removing" ("disassembling" breaks down the whole).
        bizStep: fitted ? "assembling" : e.station === "service" ? "repairing" : "removing",
        ...(fitted ? { disposition: "in_progress" } : {}),
        readPoint: where,
        bizLocation: where,
        ...(str("position") ? { "tw:position": str("position") } : {}),
        ...tail,
      };
    }
    case "item.created":
      return {
        type: "ObjectEvent",
        ...base,
        action: "ADD",
        epcList: [subject],
        bizStep: "commissioning",
        disposition: "active",
        readPoint: where,
        bizLocation: where,
        ...(str("kind") ? { "tw:kind": str("kind") } : {}),
        ...(str("state") ? { "tw:state": str("state") } : {}),
        ...tail,
      };
    case "item.state_changed": {
      const to = str("to");
      const disposition = to ? STATE_DISPOSITION[to] : undefined;
      return {
        type: "ObjectEvent",
        ...base,
        action: "OBSERVE",
        epcList: [subject],
        ...(disposition ? { disposition } : {}),
        readPoint: where,
        bizLocation: where,
        ...(str("from") ? { "tw:stateFrom": str("from") } : {}),
        ...(to ? { "tw:stateTo": to } : {}),
        ...tail,
      };
    }
    case "label.printed":
      // CBV "encoding": writing an item's identifier into a data carrier, i.e. printing its label.
      return {
        type: "ObjectEvent",
        ...base,
        action: "OBSERVE",
        epcList: [subject],
        bizStep: "encoding",
        disposition: "encoded",
        readPoint: where,
        bizLocation: where,
        ...(Object.keys(d).length ? { "tw:details": d } : {}),
        ...tail,
      };
    default:
      return {
        type: "ObjectEvent",
        ...base,
        action: "OBSERVE",
        epcList: [subject],
        readPoint: where,
        bizLocation: where,
        ...(Object.keys(d).length ? { "tw:details": d } : {}),
        ...tail,
      };
  }
}

/**
 * The CBV 2.0 bizStep of an event that carries readings (CBV 2.0 §7.1;
 * docs/REFERENCES.md, § EPCIS and CBV): measuring in the lab or a check at inspection is "inspecting"; a route step
 * at a work station (pressing, sanding, lacquering) has no bizStep of its own in the CBV, so the
 * nearest is "sensor_reporting", the readings being what the event reports (our choice, from
 * memory of the CBV's list); the step itself stays in tw:details.
 */
function readingBizStep(e: Pick<EpcisSourceEvent, "type" | "station">): string {
  return INSPECTING.has(e.type) || e.station === "inspection" ? "inspecting" : "sensor_reporting";
}

/** Kinds that arrive from a supplier: their creation is CBV "receiving". */
const RECEIVED_KINDS = new Set<ItemKind>(["unit_batch", "maker_lot", "supplier_lot", "component_lot", "flitch"]);
/** Of those, the ones that are a class of things (a lot), named in quantityList rather than epcList. */
const CLASS_KINDS = new Set<ItemKind>(["unit_batch", "maker_lot", "supplier_lot", "component_lot"]);

/** A dealer as a party: there is no GLN on record for dealers, so a URI under our own address. */
export const dealerUri = (code: string, baseUri: string) => `${trimBase(baseUri)}/id/dealer/${encodeURIComponent(code)}`;

/** The workshop as a party: its GLN as a GS1 Digital Link when TWINLEAF_GLN is set, else a URI under our own address. */
export function workshopUri(baseUri: string, env: Record<string, string | undefined> = process.env): string {
  const r = checkGs1Settings(env);
  return r.ok && r.settings.gln ? digitalLink({ gln: r.settings.gln }) : `${trimBase(baseUri)}/id/workshop`;
}

/**
 * A lot's class-level identifier: an LGTIN-style Digital Link `/01/{gtin}/10/{lot}` when its
 * supplier's GTIN is on record, otherwise a class URI under our own address.
 */
export function lotClassUri(item: Pick<EpcisItem, "identity" | "attrs">, baseUri: string): string {
  const gtin = typeof item.attrs?.gtin === "string" ? item.attrs.gtin : null;
  const lot = typeof item.attrs?.lot === "string" ? item.attrs.lot : null;
  if (gtin && lot && /^\d{8,14}$/.test(gtin)) return digitalLink({ gtin, lot });
  return `${trimBase(baseUri)}/class/${encodeURIComponent(item.identity)}`;
}

interface Shared {
  base: { eventID: string; eventTime: string; eventTimeZoneOffset: string };
  where: { id: string };
  subject: string;
  tail: Ext;
  uriOf: (id: string | null, identity: string | null) => string;
}

/**
 * The events a supply-chain partner reads, or null for any other: a pair packed into its carton
 * (an AggregationEvent, parent the carton's SSCC, children the pair and its speakers), a pair
 * shipped (ObjectEvent, shipping, in_transit, from the workshop to the dealer as owning parties),
 * and the receiving of lots, batches and flitches (a lot as a class in quantityList).
 */
function supplyChainEvent(e: EpcisSourceEvent, itemsById: ReadonlyMap<string, EpcisItem>, baseUri: string, ctx: ReadingContext, s: Shared): EpcisEvent | null {
  const d = e.data ?? {};
  const str = (k: string) => (typeof d[k] === "string" ? (d[k] as string) : null);
  const parent = typeof d.parentId === "string" ? itemsById.get(d.parentId) : undefined;

  if (e.type === "link.fitted" && parent?.kind === "carton") {
    const speakers = Array.isArray(d.speakers) ? d.speakers.filter((x): x is string => typeof x === "string") : [];
    return {
      type: "AggregationEvent",
      ...s.base,
      action: "ADD",
      parentID: itemUri(parent, baseUri),
      childEPCs: [s.subject, ...speakers.map((identity) => s.uriOf(ctx.itemsByIdentity?.get(identity)?.id ?? null, identity))],
      bizStep: "packing",
      disposition: "in_progress",
      readPoint: s.where,
      bizLocation: s.where,
      ...(str("position") ? { "tw:position": str("position") } : {}),
      "tw:carton": parent.identity,
      ...s.tail,
    };
  }

  if (e.type === "pair.shipped") {
    const carton = str("carton") ? ctx.itemsByIdentity?.get(str("carton")!) : undefined;
    const dealer = str("dealer");
    return {
      type: "ObjectEvent",
      ...s.base,
      action: "OBSERVE",
      epcList: [s.subject, ...(carton ? [itemUri(carton, baseUri)] : [])],
      bizStep: "shipping",
      disposition: "in_transit",
      readPoint: s.where,
      bizLocation: s.where,
      sourceList: [{ type: "owning_party", source: ctx.workshopUri ?? workshopUri(baseUri) }],
      ...(dealer ? { destinationList: [{ type: "owning_party", destination: dealerUri(dealer, baseUri) }] } : {}),
      // The delivery note is the shipment's despatch advice (CBV business transaction type "desadv").
      ...(str("shipment") ? { bizTransactionList: [{ type: "desadv", bizTransaction: `${trimBase(baseUri)}/api/v1/shipments/${encodeURIComponent(str("shipment")!)}/delivery-note` }] } : {}),
      ...(str("shipment") ? { "tw:shipment": str("shipment") } : {}),
      ...(carton ? { "tw:carton": carton.identity } : {}),
      ...s.tail,
    };
  }

  const item = itemsById.get(e.subjectId);
  if (e.type === "item.created" && item && RECEIVED_KINDS.has(item.kind)) {
    const isClass = CLASS_KINDS.has(item.kind);
    const quantity = ctx.lotQuantities?.get(item.id);
    return {
      type: "ObjectEvent",
      ...s.base,
      action: "ADD",
      ...(isClass ? { epcList: [], quantityList: [{ epcClass: lotClassUri(item, baseUri), ...(quantity ? { quantity } : {}) }] } : { epcList: [s.subject] }),
      bizStep: "receiving",
      disposition: "in_progress",
      readPoint: s.where,
      bizLocation: s.where,
      "tw:kind": item.kind,
      "tw:identity": item.identity,
      ...s.tail,
    };
  }
  return null;
}

/**
 * Maps register events (oldest first) to EPCIS events. A correction is answered the EPCIS 2.0
 * way: a copy of the original event, same eventID and eventTime, carrying an
 * errorDeclaration that names the correcting event, placed at the correction's time and followed
 * by the correcting event itself. Events are never changed, so neither is the original's entry.
 */
export function toEpcisEvents(
  source: readonly EpcisSourceEvent[],
  itemsById: ReadonlyMap<string, EpcisItem>,
  opts: EpcisOptions,
  ctx: ReadingContext = {},
): EpcisEvent[] {
  const mapped = new Map<number, EpcisEvent>();
  const out: EpcisEvent[] = [];
  for (const e of source) {
    const event = toEpcisEvent(e, itemsById, opts.baseUri, ctx);
    const original = e.correctsId !== null ? mapped.get(e.correctsId) : undefined;
    if (original) {
      const errorDeclaration: EpcisErrorDeclaration = {
        declarationTime: e.at.toISOString(),
        reason: "incorrect_data",
        correctiveEventIDs: [event.eventID],
        ...(e.reason ? { "tw:reason": e.reason } : {}),
      };
      out.push({ ...original, errorDeclaration });
    }
    mapped.set(e.id, event);
    out.push(event);
  }
  return out;
}

/** Wraps events in an EPCIS 2.0 document with our extension namespace declared. */
export function epcisDocument(eventList: EpcisEvent[], opts: EpcisOptions & { now?: Date }): EpcisDocument {
  return {
    "@context": [EPCIS_CONTEXT, { tw: `${trimBase(opts.baseUri)}/ns#` }],
    type: "EPCISDocument",
    schemaVersion: "2.0",
    creationDate: (opts.now ?? new Date()).toISOString(),
    epcisBody: { eventList },
  };
}

/**
 * Every event about an item and about everything that was ever inside it (a replaced part's
 * history stays in the record), as one EPCIS 2.0 document, oldest first.
 */
export async function epcisDocumentForItem(db: DbOrTx, itemId: string, opts: EpcisOptions & { now?: Date }): Promise<EpcisDocument> {
  const nodes = await traceBackward(db, itemId, { mode: "ever" });
  if (nodes.length === 0) throw new AppError(404, "No item with that id.");
  return epcisDocumentForItems(db, nodes.map((n) => n.id), opts);
}

/** Many ids a statement, under SQLite's limit on bound values. */
const ID_CHUNK = 500;

/**
 * Every event about these items (their own events only, nothing inside them), as one EPCIS 2.0
 * document, oldest first: the export of a containment's affected serials.
 */
export async function epcisDocumentForItems(db: DbOrTx, itemIds: readonly string[], opts: EpcisOptions & { now?: Date }): Promise<EpcisDocument> {
  const ids = [...new Set(itemIds)];
  const rows: EpcisSourceEvent[] = [];
  for (let i = 0; i < ids.length; i += ID_CHUNK) {
    rows.push(
      ...(await db
        .select({
          id: events.id,
          at: events.at,
          station: events.station,
          type: events.type,
          subjectId: events.subjectId,
          data: events.data,
          reason: events.reason,
          correctsId: events.correctsId,
        })
        .from(events)
        .where(and(eq(events.subjectKind, "item"), inArray(events.subjectId, ids.slice(i, i + ID_CHUNK))))),
    );
  }
  // Oldest first across the chunks, as one query's ORDER BY at, id would give.
  rows.sort((a, b) => a.at.getTime() - b.at.getTime() || a.id - b.id);

  // Link events may name a holder outside the set (the carton or shipment holding a pair).
  const wanted = new Set(ids);
  for (const r of rows) if (typeof r.data?.parentId === "string") wanted.add(r.data.parentId);
  const all = [...wanted];
  const named = await namedItems(db, (chunk) => inArray(items.id, chunk), all);
  // Packing and shipping name the carton and the speakers by serial.
  const identities = [...new Set(rows.flatMap((r) => [r.data?.carton, ...(Array.isArray(r.data?.speakers) ? r.data.speakers : [])]).filter((v): v is string => typeof v === "string"))];
  const byIdentity = identities.length ? await namedItems(db, (chunk) => inArray(items.identity, chunk), identities) : [];

  const itemsById = new Map([...named, ...byIdentity].map((i) => [i.id, i]));
  const ctx = await readingContext(db, rows);
  ctx.itemsByIdentity = new Map([...named, ...byIdentity].map((i) => [i.identity, i]));
  ctx.lotQuantities = await lotQuantities(db, named.filter((i) => CLASS_KINDS.has(i.kind)).map((i) => i.id));
  ctx.workshopUri = workshopUri(opts.baseUri);
  return epcisDocument(toEpcisEvents(rows, itemsById, opts, ctx), opts);
}

/** Items with what naming them needs (model GTIN, a carton's SSCC, their attrs), by chunks of ids or serials. */
async function namedItems(db: DbOrTx, where: (chunk: string[]) => ReturnType<typeof inArray>, keys: string[]): Promise<EpcisItem[]> {
  const out: EpcisItem[] = [];
  for (let i = 0; i < keys.length; i += ID_CHUNK) {
    out.push(
      ...(await db
        .select({ id: items.id, kind: items.kind, identity: items.identity, pairGtin: models.pairGtin, sscc: cartonSsccs.sscc, attrs: items.attrs })
        .from(items)
        .leftJoin(models, eq(models.id, items.modelId))
        .leftJoin(cartonSsccs, eq(cartonSsccs.cartonId, items.id))
        .where(where(keys.slice(i, i + ID_CHUNK)))),
    );
  }
  return out;
}

/** How many things each lot or batch ever went into (a batch sits in each of its units): its quantity at receiving. */
async function lotQuantities(db: DbOrTx, lotIds: string[]): Promise<Map<string, number>> {
  const out = new Map<string, number>();
  for (let i = 0; i < lotIds.length; i += ID_CHUNK) {
    const rows = await db
      .select({ id: links.childId, n: sql<number>`count(DISTINCT ${links.parentId})` })
      .from(links)
      .where(inArray(links.childId, lotIds.slice(i, i + ID_CHUNK)))
      .groupBy(links.childId);
    for (const r of rows) out.set(r.id, Number(r.n));
  }
  return out;
}

/** The route versions and crossover part readings the events' readings need for their labels and units. */
async function readingContext(db: DbOrTx, rows: EpcisSourceEvent[]): Promise<ReadingContext> {
  const routeHolders = [...new Set(rows.filter((r) => (r.type === "route.step_recorded" || r.type === "route.step_corrected") && typeof r.data?.pair === "string").map((r) => r.data.pair as string))];
  const boardEvents = rows.filter((r) => r.type === "crossover.built").map((r) => r.id);
  const [routes, parts] = await Promise.all([
    routeHolders.length
      ? db
          .select({ identity: items.identity, steps: processSpecs.steps })
          .from(items)
          .innerJoin(routeStarts, eq(routeStarts.pairId, items.id))
          .innerJoin(processSpecs, eq(processSpecs.id, routeStarts.specId))
          .where(inArray(items.identity, routeHolders))
      : [],
    boardEvents.length
      ? db
          .select({ eventId: crossoverParts.eventId, position: crossoverParts.position, partNumber: crossoverParts.partNumber, nominal: crossoverParts.nominal, unit: crossoverParts.unit, tolerance: crossoverParts.tolerance, reading: crossoverParts.reading })
          .from(crossoverParts)
          .where(inArray(crossoverParts.eventId, boardEvents))
          .orderBy(asc(crossoverParts.id))
      : [],
  ]);
  const crossover = new Map<number, CrossoverPartReading[]>();
  for (const { eventId, ...p } of parts) crossover.set(eventId, [...(crossover.get(eventId) ?? []), p]);
  return { routeSteps: new Map(routes.map((r) => [r.identity, r.steps])), crossoverParts: crossover };
}
