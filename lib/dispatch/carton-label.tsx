import "server-only";
import type { ReactNode } from "react";
import { Document, Image, Page, Text, View, renderToBuffer } from "@react-pdf/renderer";
import { toBuffer } from "bwip-js/node";
import { and, eq, isNull, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { finishes, items, links, models } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { itemByIdentity } from "@/lib/genealogy/graph";
import { pairOfSpeaker } from "@/lib/genealogy/pair-speakers";
import { barcodeGeometry, LabelError, QUIET_ZONE_MODULES } from "@/lib/labels/barcodes";
import { MONO_FONT, TEXT_FONT, registerPdfFonts } from "@/lib/labels/fonts";
import { normaliseScan, parseSerial } from "@/lib/serials/format";
import { cartonElementString, type CartonElementString } from "@/lib/serials/gs1";
import { ssccElement, ssccHri } from "@/lib/gs1";
import { isCalendarDay, isoDay, noonUtc } from "./dates";
import { ssccsOf } from "./sscc";
import { dealerLines, workshopParty, type Party } from "./workshop";

/** The layout name recorded with each print (label.printed events). */
export const CARTON_LABEL_LAYOUT = "carton-100x150";

export interface CartonLabelData {
  cartonId: string;
  carton: string;
  pair: string;
  left: string | null;
  right: string | null;
  /** "pair", or the side of the one speaker a service return carries ("L" / "R"). */
  contents: "pair" | "L" | "R";
  modelCode: string;
  modelName: string;
  finish: string | null;
  gtin: string;
  /** YYYY-MM-DD, the day it was packed. */
  packedOn: string;
  /** (01) GTIN and (21) pair serial: what is inside. */
  element: CartonElementString;
  /** The carton's SSCC (18 digits) and its company prefix's length, for the spaced human-readable line; null for a carton from before SSCCs. */
  sscc: { value: string; prefixLength: number } | null;
  /** GS1 logistic label blocks: the workshop, the dealer once it ships, the carrier once it ships. */
  supplier: Party;
  customer: Party | null;
  shipToPostcode: string | null;
  carrier: string | null;
  tracking: string | null;
}

/** What a carton's label prints, read from the register; 404 for an unknown carton. */
export async function cartonLabelData(db: DbOrTx, cartonText: string): Promise<CartonLabelData> {
  const t = normaliseScan(cartonText);
  const parsed = parseSerial(t);
  const carton = t ? await itemByIdentity(db, parsed?.valid ? parsed.canonical : t) : null;
  if (!carton || carton.kind !== "carton") throw new AppError(404, `${cartonText.trim() || "That"} is not a carton in the register.`);

  // A packed pair sits in its carton at PAIR. A service return of one speaker records the speaker
  // it carries (the speaker stays fitted in its pair: a thing has one holder), and the label names
  // that pair with only the one speaker, so a scan at the far end still finds the register entry.
  const [held] = await db
    .select({ pair: items })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(eq(links.parentId, carton.id), eq(links.position, "PAIR"), isNull(links.endedAt)))
    .limit(1);
  const lone = !held && typeof carton.attrs.speaker === "string" ? await itemByIdentity(db, carton.attrs.speaker) : null;
  const lonePlace = lone?.kind === "speaker" ? await pairOfSpeaker(db, lone.id) : null;
  if (!held && !lonePlace) throw new LabelError(`${carton.identity} holds no pair, so it has no label to print.`);
  const pair = held?.pair ?? lonePlace!.pair;
  const contents: CartonLabelData["contents"] = held ? "pair" : lonePlace!.side;
  const [model] = await db.select().from(models).where(eq(models.id, carton.modelId ?? pair.modelId ?? "")).limit(1);
  if (!model) throw new LabelError(`${carton.identity} has no model, so its label has no GTIN.`);
  const [finish] = pair.finishId ? await db.select({ name: finishes.name }).from(finishes).where(eq(finishes.id, pair.finishId)).limit(1) : [];
  const speakers = await db
    .select({ identity: items.identity, position: links.position })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(eq(links.parentId, pair.id), isNull(links.endedAt)));

  // The GTIN and date as recorded when it was packed; cartons from before packedOn was kept use their creation date.
  const gtin = typeof carton.attrs.gtin === "string" ? carton.attrs.gtin : model.pairGtin;
  const recorded = typeof carton.attrs.packedOn === "string" && isCalendarDay(carton.attrs.packedOn) ? carton.attrs.packedOn : null;
  const packedOn = recorded ?? isoDay(carton.createdAt);
  let element: CartonElementString;
  try {
    element = cartonElementString({ gtin, serial: pair.identity });
  } catch (e) {
    throw new LabelError(`The label of ${carton.identity} cannot be made: ${(e as Error).message}.`);
  }
  const sscc = (await ssccsOf(db, [carton.id])).get(carton.id) ?? null;
  // Once shipped, the carton sits in its shipment: the dealer and carrier blocks are filled in.
  const [sent] = await db.all<{ name: string; address: string; postcode: string; city: string; country: string; carrier: string; tracking: string }>(sql`
    SELECT d.name, d.address, d.postcode, d.city, d.country, sd.carrier, sd.tracking
    FROM links l JOIN shipment_details sd ON sd.item_id = l.parent_id JOIN dealers d ON d.id = sd.dealer_id
    WHERE l.child_id = ${carton.id} AND l.parent_kind = 'shipment'
    ORDER BY l.started_at DESC LIMIT 1`);
  return {
    cartonId: carton.id,
    carton: carton.identity,
    pair: pair.identity,
    left: contents === "R" ? null : (speakers.find((s) => s.position === "L")?.identity ?? null),
    right: contents === "L" ? null : (speakers.find((s) => s.position === "R")?.identity ?? null),
    contents,
    modelCode: model.code,
    modelName: model.name,
    finish: finish?.name ?? null,
    gtin,
    packedOn,
    element,
    sscc: sscc ? { value: sscc.sscc, prefixLength: sscc.prefixLength } : null,
    supplier: workshopParty(),
    customer: sent ? { name: sent.name, lines: dealerLines(sent) } : null,
    shipToPostcode: sent?.postcode.trim() || null,
    carrier: sent?.carrier ?? null,
    tracking: sent?.tracking ?? null,
  };
}

const PT_PER_MM = 72 / 25.4;
const mm = (v: number) => v * PT_PER_MM;

const PAGE_MM: [number, number] = [100, 150];
const PAD_MM = 4;
const WIDTH_MM = PAGE_MM[0] - 2 * PAD_MM;

/**
 * Module size of the bars: at least 0.25 mm (2 dots of a 203-dpi printer) and at most 0.5 mm,
 * whole dots so every bar of one width prints the same. Common practice for labels read with a
 * hand scanner; GS1's logistic label asks for larger SSCC bars where they fit, hence the larger
 * cap for the SSCC (from memory of the General Specifications' symbol table: 0.495–1.016 mm).
 */
const X_MM = { min: 0.25, max: 0.5 };
const SSCC_X_MM = { min: 0.25, max: 0.75 };

/** IBM Plex Mono advances every glyph 600/1000 em. */
const MONO_ADVANCE = 0.6;
const fitMono = (text: string, widthPt: number, max: number) => Math.max(6, Math.min(max, widthPt / (MONO_ADVANCE * Math.max(1, text.length))));

const LEAF = "#2e6a57";
const INK = "#1c2421";
const SOFT_INK = "#46524d";

interface PlacedSymbol {
  png: Buffer;
  widthPt: number;
  heightPt: number;
}

/** A GS1-128 symbol across the label, bars only (the human-readable line is set in text beneath). */
async function symbol(text: string, dpi: number, heightMm: number, x: { min: number; max: number }): Promise<PlacedSymbol> {
  // Through lib/labels first: bad GS1 data becomes a LabelError with a message for the packer.
  const { modulesWide } = await barcodeGeometry("gs1-128", text);
  const dotsPerMm = dpi / 25.4;
  const k = Math.floor(Math.min(x.max * dotsPerMm, (WIDTH_MM * dotsPerMm) / modulesWide));
  if (k < 2 || k / dotsPerMm < x.min) {
    throw new LabelError(`The carton barcode does not fit a 100 × 150 mm label at ${dpi} dpi with bars of at least ${x.min} mm. Use a finer printer.`);
  }
  const xMm = k / dotsPerMm;
  const png = await toBuffer({
    bcid: "gs1-128",
    text,
    scale: k,
    backgroundcolor: "FFFFFF",
    paddingwidth: QUIET_ZONE_MODULES["gs1-128"],
    paddingheight: 0,
    // bwip-js reads height in millimetres at 72 units per inch, one unit per module at scale 1.
    height: (heightMm / xMm) * (25.4 / 72),
  });
  // One PNG pixel per printer dot: the pixel counts give the printed size.
  const pxWide = png.readUInt32BE(16);
  const pxHigh = png.readUInt32BE(20);
  return { png, widthPt: mm(pxWide / dotsPerMm), heightPt: mm(pxHigh / dotsPerMm) };
}

const formatPacked = (day: string) =>
  new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: "UTC" }).format(noonUtc(day));

/**
 * The carton label, 100 × 150 mm, laid out as GS1's logistic label: the supplier block (the
 * workshop), the customer block (the dealer, once the carton ships) and the carrier block (ship-to
 * postcode, carrier and tracking once shipped), then what is inside with the GS1-128 of (01) the
 * pair's GTIN and (21) its serial, and at the bottom the SSCC in GS1-128 (00) with its spaced
 * human-readable line. `printerDpi` (203, 300 or 600; default 203) sets the dot grid of the bars.
 */
export async function renderCartonLabel(data: CartonLabelData, opts: { printerDpi?: number } = {}): Promise<Buffer> {
  const dpi = opts.printerDpi ?? 203;
  if (![203, 300, 600].includes(dpi)) throw new LabelError("The printer resolution is 203, 300 or 600 dpi.");
  registerPdfFonts();
  const contentBars = await symbol(data.element.bwipText, dpi, 12, X_MM);
  const ssccBars = data.sscc ? await symbol(ssccElement(data.sscc.value), dpi, 22, SSCC_X_MM) : null;
  const widthPt = mm(WIDTH_MM);

  const block = (title: string, children: ReactNode) => (
    <View style={{ borderBottomWidth: 0.8, borderBottomColor: INK, paddingVertical: 3 }}>
      <Text style={{ fontSize: 6.5, color: SOFT_INK, letterSpacing: 0.5 }}>{title}</Text>
      {children}
    </View>
  );
  const lines = (party: Party) => (
    <>
      <Text style={{ fontSize: 9, fontWeight: 700 }}>{party.name}</Text>
      {party.lines.map((l) => (
        <Text key={l} style={{ fontSize: 8 }}>
          {l}
        </Text>
      ))}
    </>
  );
  const contents = data.contents === "pair" ? "Matched pair" : `${data.contents === "L" ? "Left" : "Right"} speaker only`;

  const doc = (
    <Document title={`Carton label ${data.carton}`} creator="Twinleaf" producer="Twinleaf">
      <Page size={[mm(PAGE_MM[0]), mm(PAGE_MM[1])]} style={{ fontFamily: TEXT_FONT, color: INK, padding: mm(PAD_MM), flexDirection: "column" }}>
        <View style={{ flexDirection: "row", borderBottomWidth: 0.8, borderBottomColor: INK }}>
          <View style={{ width: "50%", paddingRight: 4, paddingBottom: 3 }}>
            <Text style={{ fontSize: 6.5, color: SOFT_INK, letterSpacing: 0.5 }}>FROM</Text>
            {lines(data.supplier)}
          </View>
          <View style={{ width: "50%", paddingLeft: 4, paddingBottom: 3, borderLeftWidth: 0.8, borderLeftColor: INK }}>
            <Text style={{ fontSize: 6.5, color: SOFT_INK, letterSpacing: 0.5 }}>TO</Text>
            {data.customer ? lines(data.customer) : <Text style={{ fontSize: 8, color: SOFT_INK }}>Dealer chosen when the carton ships: print the label again then.</Text>}
          </View>
        </View>
        {block(
          "CARRIER",
          <View style={{ flexDirection: "row", justifyContent: "space-between" }}>
            <Text style={{ fontSize: 8 }}>{data.shipToPostcode ? `Ship to postcode ${data.shipToPostcode}` : "Ship to postcode —"}</Text>
            <Text style={{ fontSize: 8 }}>{data.carrier ? `${data.carrier}, tracking ${data.tracking}` : "Carrier and tracking when shipped"}</Text>
          </View>,
        )}
        <View style={{ paddingVertical: 3 }}>
          <Text style={{ fontSize: 8, fontWeight: 700, color: LEAF, letterSpacing: 1 }}>TWINLEAF · {contents.toUpperCase()}</Text>
          <Text style={{ fontSize: 12, fontWeight: 700 }}>
            {data.modelCode} {data.modelName}
          </Text>
          <Text style={{ fontSize: 8, color: SOFT_INK }}>
            {data.finish ?? "Finish not recorded"} · packed {formatPacked(data.packedOn)}
          </Text>
          <View style={{ flexDirection: "row", marginTop: 2 }}>
            <Text style={{ fontSize: 7, color: SOFT_INK, width: 34 }}>Carton</Text>
            <Text style={{ fontFamily: MONO_FONT, fontSize: 8 }}>{data.carton}</Text>
          </View>
          <View style={{ flexDirection: "row" }}>
            <Text style={{ fontSize: 7, color: SOFT_INK, width: 34 }}>Pair</Text>
            <Text style={{ fontFamily: MONO_FONT, fontWeight: 600, fontSize: fitMono(data.pair, widthPt - 34, 10) }}>{data.pair}</Text>
          </View>
          {data.contents !== "R" ? (
            <View style={{ flexDirection: "row" }}>
              <Text style={{ fontSize: 7, color: SOFT_INK, width: 34 }}>Left</Text>
              <Text style={{ fontFamily: MONO_FONT, fontSize: 8 }}>{data.left ?? "—"}</Text>
            </View>
          ) : null}
          {data.contents !== "L" ? (
            <View style={{ flexDirection: "row" }}>
              <Text style={{ fontSize: 7, color: SOFT_INK, width: 34 }}>Right</Text>
              <Text style={{ fontFamily: MONO_FONT, fontSize: 8 }}>{data.right ?? "—"}</Text>
            </View>
          ) : null}
        </View>
        <View style={{ borderWidth: 1.5, borderColor: INK, padding: 3, flexDirection: "row", alignItems: "center" }}>
          <Text style={{ fontSize: 10, fontWeight: 700, marginRight: 6 }}>HEAVY · two-person lift</Text>
          <Text style={{ fontSize: 7 }}>Lift with two people or a lifting aid.</Text>
        </View>
        <View style={{ marginTop: "auto", alignItems: "center" }}>
          <Image src={{ data: contentBars.png, format: "png" }} style={{ width: contentBars.widthPt, height: contentBars.heightPt }} />
          <Text style={{ fontFamily: MONO_FONT, fontSize: fitMono(data.element.hri, widthPt, 8), marginTop: 1 }}>{data.element.hri}</Text>
          {ssccBars && data.sscc ? (
            <>
              <Text style={{ fontSize: 6.5, color: SOFT_INK, marginTop: 4, alignSelf: "flex-start" }}>SSCC</Text>
              <Image src={{ data: ssccBars.png, format: "png" }} style={{ width: ssccBars.widthPt, height: ssccBars.heightPt }} />
              {/* One text per group: react-pdf's fontkit cannot lay out IBM Plex Mono's space glyph. */}
              <View style={{ flexDirection: "row", marginTop: 1 }}>
                {ssccHri(data.sscc.value, data.sscc.prefixLength)
                  .split(" ")
                  .map((group, i) => (
                    <Text key={i} style={{ fontFamily: MONO_FONT, fontWeight: 600, fontSize: 10, marginLeft: i ? 5 : 0 }}>
                      {group}
                    </Text>
                  ))}
              </View>
            </>
          ) : (
            <Text style={{ fontSize: 7, color: SOFT_INK, marginTop: 4 }}>No SSCC: this carton was packed before SSCCs were kept.</Text>
          )}
        </View>
      </Page>
    </Document>
  );
  return renderToBuffer(doc);
}

/** The carton's label as a PDF, from the register. */
export async function cartonLabelPdf(db: DbOrTx, cartonIdentity: string, opts: { printerDpi?: number } = {}): Promise<Buffer> {
  return renderCartonLabel(await cartonLabelData(db, cartonIdentity), opts);
}
