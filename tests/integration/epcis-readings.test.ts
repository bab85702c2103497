/**
 * The readings the register records, made by the register's own code (the cabinet route, the lab's
 * Thiele–Small form, a crossover board's build), exported as EPCIS 2.0 sensor reports and validated
 * against GS1's EPCIS 2.0 JSON Schema (../fixtures/epcis-validate.ts). Units: UN/CEFACT Recommendation 20
 * codes; measurement types: the GS1 Web Vocabulary's (both as listed by the schema's definitions).
 */
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { finishes, models, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { setClock } from "@/lib/clock";
import { epcisDocumentForItem, type EpcisDocument, type EpcisEvent } from "@/lib/genealogy/epcis";
import { createItem } from "@/lib/genealogy/graph";
import { buildCrossover } from "@/lib/lab/crossovers";
import { recordMeasurement } from "@/lib/lab/units";
import { pairRoute, recordStep } from "@/lib/route/pair-route";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { goodReadings } from "../fixtures/route";
import { validate } from "../fixtures/epcis-validate";

const db = () => getDb();
const BASE = "https://register.example.test";
const T0 = new Date("2026-12-07T08:00:00Z");
const HOUR = 3_600_000;

let pairDoc: EpcisDocument;
let unitDoc: EpcisDocument;
let boardDoc: EpcisDocument;
const reportsOf = (doc: EpcisDocument, type: string): EpcisEvent[] => doc.epcisBody.eventList.filter((e) => e["tw:eventType"] === type);

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const idOf = async (email: string) => (await db().select().from(users).where(eq(users.email, email)))[0]!.id;
  const veneer = await idOf("veneer@demo.twinleaf.test");
  const cabinet = await idOf("cabinet@demo.twinleaf.test");
  const lab = await idOf("lab@demo.twinleaf.test");
  const model = (await db().select().from(models)).find((m) => m.leavesPerFace === 2)!;
  const walnut = (await db().select().from(finishes)).find((f) => f.kind === "veneer")!;

  // A veneered pair as the veneer room makes it, then its first five route steps.
  const flitch = await receiveFlitch(db(), { finishId: walnut.id, logReference: "R", supplier: "S", receivedOn: "2026-11-01", leafThicknessMm: 0.6, leafCount: 4 }, { id: veneer });
  for (const l of (await flitchView(db(), flitch.identity))!.leaves) await measureLeaf(db(), l.id, { lengthMm: 900, widthMm: 300, usable: true }, { id: veneer });
  const [made] = await confirmRuns(db(), { flitchId: flitch.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, { id: veneer });
  const pair = made!.pair;
  const spec = (await pairRoute(db(), pair)).spec;
  for (const [seq, when] of [[1, T0], [2, new Date(T0.getTime() + HOUR)], [3, new Date(T0.getTime() + 2 * HOUR)], [4, new Date(T0.getTime() + 7 * HOUR)], [5, new Date(T0.getTime() + 8 * HOUR)]] as const) {
    setClock(when);
    const input = goodReadings(spec.steps.find((s) => s.seq === seq)!.key);
    await recordStep(db(), { pairId: pair.id, seq, sides: ["L", "R"], startedAt: when, readings: input }, { id: cabinet });
  }
  setClock(null);
  pairDoc = await epcisDocumentForItem(db(), pair.id, { baseUri: BASE });

  // A tweeter's Thiele–Small set through the lab's form: the worked example of docs/REFERENCES.md, § Loudspeaker parameters.
  const unit = await db().transaction((tx) => createItem(tx, { kind: "drive_unit", identity: "D-TW-26-99001-X", state: "measured", partType: "tweeter", modelId: model.id }, { actorId: lab, station: "lab" }));
  await recordMeasurement(db(), { itemId: unit.id, response: null, ts: { fsHz: 37.51, qts: null, qes: 0.4329, qms: 2.996, reOhm: 6, vasL: 30.1, sensitivityDb: null } }, { id: lab });
  unitDoc = await epcisDocumentForItem(db(), unit.id, { baseUri: BASE });

  // A crossover board built from component lots, every part measured.
  const { crossover } = await buildCrossover(db(), {
    modelId: model.id,
    parts: [
      { position: "C1", lot: "LOT-EP-C47", partNumber: "PP-475-400", nominal: "4.7µF", tolerance: "J", reading: "4.75µF" },
      { position: "L1", lot: "LOT-EP-L82", partNumber: "AC-082", nominal: "0.82mH", tolerance: "K", reading: "0.80 mH" },
      { position: "R1", lot: "LOT-EP-R82", partNumber: "WW-8R2-10", nominal: "8.2Ω", tolerance: "J", reading: "8R1" },
    ],
  }, { id: lab });
  boardDoc = await epcisDocumentForItem(db(), crossover.id, { baseUri: BASE });
}, 60_000);
afterAll(() => setClock(null));

describe("the readings the register records, as EPCIS sensor reports", () => {
  test.each([["pair"], ["drive unit"], ["crossover board"]])("the %s's document validates against GS1's EPCIS 2.0 JSON Schema", (which) => {
    const doc = { pair: pairDoc, "drive unit": unitDoc, "crossover board": boardDoc }[which]!;
    const r = validate(doc);
    expect(r.own.errors).toEqual([]);
    expect(r.ajv8.errors).toEqual([]);
  });

  test("the press step reports the platen temperature in °C (CEL) and the time in minutes (MIN), for each cabinet", () => {
    const press = reportsOf(pairDoc, "route.step_recorded").filter((e) => e["tw:details"] && (e["tw:details"] as { seq?: number }).seq === 1);
    expect(press).toHaveLength(2);
    for (const e of press) {
      expect(e.sensorElementList![0]!.sensorReport).toEqual([
        { type: "gs1:Temperature", value: 137, uom: "CEL", "tw:name": "platenC", "tw:label": "Platen temperature" },
        { type: "gs1:Time", value: 22, uom: "MIN", "tw:name": "minutes", "tw:label": "Time in the press" },
      ]);
    }
  });

  test("the trim step reports millimetres (MMT); the hand check a pass as a boolean, as an inspection", () => {
    const steps = reportsOf(pairDoc, "route.step_recorded");
    const trim = steps.find((e) => (e["tw:details"] as { seq?: number }).seq === 2)!;
    expect(trim.sensorElementList![0]!.sensorReport).toEqual([{ type: "gs1:Length", value: 0.1, uom: "MMT", "tw:name": "deviationMm", "tw:label": "Trim deviation" }]);
    const check = steps.find((e) => (e["tw:details"] as { seq?: number }).seq === 5)!;
    expect(check.bizStep).toBe("inspecting");
    expect(check.sensorElementList![0]!.sensorReport).toEqual([{ type: `${BASE}/readings/pass`, booleanValue: true, "tw:name": "pass", "tw:label": "Inspector's check: surface fit for lacquer" }]);
    // Machine sanding now records its grit, a P-grade number (FEPA / ISO 6344 P-scale).
    const sanding = steps.find((e) => (e["tw:details"] as { seq?: number }).seq === 4)!;
    expect(sanding.sensorElementList![0]!.sensorReport).toEqual([expect.objectContaining({ value: 240, "tw:name": "grit", "tw:label": "Finishing grit" })]);
  });

  test("the Thiele–Small set reports Fs in hertz, the Q figures as dimensionless, Re in ohms and Vas in litres", () => {
    const [ts] = reportsOf(unitDoc, "unit.ts_measured");
    const reports = ts!.sensorElementList![0]!.sensorReport;
    expect(reports.map((r) => [r["tw:name"], r.type, r.uom ?? null])).toEqual([
      ["fs", "gs1:Frequency", "HTZ"],
      ["qts", "gs1:Dimensionless", null],
      ["qes", "gs1:Dimensionless", null],
      ["qms", "gs1:Dimensionless", null],
      ["re", "gs1:Resistance", "OHM"],
      ["vas", "gs1:Volume", "LTR"],
    ]);
    expect(reports[0]!.value).toBe(37.51);
    // The lab's form derives Qts = Qes·Qms/(Qes+Qms): docs/REFERENCES.md, § Loudspeaker parameters gives 0.3783 for the worked
    // example, 0.37825 from its rounded inputs 0.4329 and 2.996 (as in lab.test.ts).
    expect(reports[1]!.value).toBeCloseTo(0.37825, 5);
  });

  test("the crossover board reports each part's reading in farads, henries and ohms, with its nominal value and tolerance letter", () => {
    const [built] = reportsOf(boardDoc, "crossover.built");
    const reports = built!.sensorElementList![0]!.sensorReport;
    expect(reports.map((r) => [r["tw:name"], r.type, r.uom, r["tw:details"]])).toEqual([
      ["C1", "gs1:Capacitance", "FAR", { nominal: 4.7e-6, tolerance: "J" }],
      ["L1", "gs1:Inductance", "81", { nominal: 0.82e-3, tolerance: "K" }],
      ["R1", "gs1:Resistance", "OHM", { nominal: 8.2, tolerance: "J" }],
    ]);
    expect(reports[0]!.value).toBeCloseTo(4.75e-6, 15);
    expect(reports[2]!.value).toBeCloseTo(8.1, 12);
  });
});
