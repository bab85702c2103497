import "server-only";
import { Document, Image, Page, Text, View, renderToBuffer } from "@react-pdf/renderer";
import { toBuffer } from "bwip-js/node";
import { and, eq, isNull } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { finishes, items, links, models } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { itemByIdentity } from "@/lib/genealogy/graph";
import { pairOfSpeaker } from "@/lib/genealogy/pair-speakers";
import { barcodeGeometry, LabelError, QUIET_ZONE_MODULES } from "@/lib/labels/barcodes";
import { MONO_FONT, TEXT_FONT, registerPdfFonts } from "@/lib/labels/fonts";
import { normaliseScan, parseSerial } from "@/lib/serials/format";
import { cartonElementString, type CartonElementString } from "@/lib/serials/gs1";
import { isCalendarDay, isoDay, noonUtc } from "./dates";

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
  /** YYYY-MM-DD, the (11) date. */
  packedOn: string;
  element: CartonElementString;
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
    element = cartonElementString({ gtin, serial: pair.identity, productionDate: noonUtc(packedOn), timeZone: "UTC" });
  } catch (e) {
    throw new LabelError(`The label of ${carton.identity} cannot be made: ${(e as Error).message}.`);
  }
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
  };
}

const PT_PER_MM = 72 / 25.4;
const mm = (v: number) => v * PT_PER_MM;

const PAGE_MM: [number, number] = [100, 150];
const PAD_MM = 4;
/** Bar height, and how much room the human-readable line under the bars takes. */
const BAR_MM = 22;
const GAP_MM = 4;

/**
 * Module size. The element string is about 400 modules with its quiet zones, so across the
 * label's 92 mm it would need modules under 0.25 mm, which a 203-dpi printer cannot draw (2 dots
 * are 0.25 mm) and which scan poorly from a carton. The symbol therefore runs down the 150 mm
 * side (ladder orientation), where every usual printer gets modules of at least 0.25 mm. Whole
 * dots, as lib/labels/sheets.tsx does, so every bar of one width prints the same. Common
 * practice for labels read with a hand scanner; no published source.
 */
const X_MM = { min: 0.25, max: 0.5 };

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

/** The GS1-128 symbol, rotated to read bottom to top, its human-readable line beside the bars. */
async function symbol(text: string, dpi: number): Promise<PlacedSymbol> {
  // Through lib/labels first: bad GS1 data becomes a LabelError with a message for the packer.
  const { modulesWide } = await barcodeGeometry("gs1-128", text);
  const dotsPerMm = dpi / 25.4;
  const lengthMm = PAGE_MM[1] - 2 * PAD_MM;
  const k = Math.floor(Math.min(X_MM.max * dotsPerMm, (lengthMm * dotsPerMm) / modulesWide));
  if (k < 2 || k / dotsPerMm < X_MM.min) {
    throw new LabelError(`The carton barcode does not fit a 100 × 150 mm label at ${dpi} dpi with bars of at least ${X_MM.min} mm. Use a finer printer.`);
  }
  const x = k / dotsPerMm;
  const png = await toBuffer({
    bcid: "gs1-128",
    text,
    scale: k,
    rotate: "L",
    backgroundcolor: "FFFFFF",
    paddingwidth: QUIET_ZONE_MODULES["gs1-128"],
    paddingheight: 0,
    // bwip-js reads height in millimetres at 72 units per inch, one unit per module at scale 1.
    height: (BAR_MM / x) * (25.4 / 72),
    includetext: true,
    textxalign: "center",
    textsize: 10,
    textgaps: 1,
    textyoffset: -3,
  });
  // One PNG pixel per printer dot: the pixel counts give the printed size.
  const pxWide = png.readUInt32BE(16);
  const pxHigh = png.readUInt32BE(20);
  return { png, widthPt: mm(pxWide / dotsPerMm), heightPt: mm(pxHigh / dotsPerMm) };
}

const formatPacked = (day: string) =>
  new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: "UTC" }).format(noonUtc(day));

/**
 * The carton label: 100 × 150 mm, one page. GS1-128 of (01) GTIN, (11) pack date and (21) pair
 * serial with its human-readable line, the model, finish and serials in text, and the lifting
 * caution. `printerDpi` (203, 300 or 600; default 203, a usual thermal printer) sets the dot grid
 * the bars snap to.
 */
export async function renderCartonLabel(data: CartonLabelData, opts: { printerDpi?: number } = {}): Promise<Buffer> {
  const dpi = opts.printerDpi ?? 203;
  if (![203, 300, 600].includes(dpi)) throw new LabelError("The printer resolution is 203, 300 or 600 dpi.");
  registerPdfFonts();
  const bars = await symbol(data.element.bwipText, dpi);
  const columnPt = mm(PAGE_MM[0] - 2 * PAD_MM - GAP_MM) - bars.widthPt;

  const row = (label: string, value: string | null, big = false) => (
    <View style={{ marginTop: big ? 6 : 4 }}>
      <Text style={{ fontSize: 8, color: SOFT_INK }}>{label}</Text>
      <Text style={{ fontFamily: MONO_FONT, fontWeight: 600, fontSize: fitMono(value ?? "—", columnPt, big ? 15 : 11) }}>{value ?? "—"}</Text>
    </View>
  );

  const doc = (
    <Document title={`Carton label ${data.carton}`} creator="Twinleaf" producer="Twinleaf">
      <Page size={[mm(PAGE_MM[0]), mm(PAGE_MM[1])]} style={{ fontFamily: TEXT_FONT, color: INK, padding: mm(PAD_MM), flexDirection: "row" }}>
        <View style={{ width: columnPt, height: "100%", flexDirection: "column" }}>
          <Text style={{ fontSize: 9, fontWeight: 700, color: LEAF, letterSpacing: 1 }}>{data.contents === "pair" ? "TWINLEAF · MATCHED PAIR" : `TWINLEAF · ${data.contents === "L" ? "LEFT" : "RIGHT"} SPEAKER ONLY`}</Text>
          <View style={{ borderBottomWidth: 0.8, borderBottomColor: LEAF, marginTop: 3, marginBottom: 5 }} />
          <Text style={{ fontSize: 15, fontWeight: 700 }}>{data.modelCode}</Text>
          <Text style={{ fontSize: 12, fontWeight: 700 }}>{data.modelName}</Text>
          <Text style={{ fontSize: 11, color: SOFT_INK, marginTop: 2 }}>{data.finish ?? "Finish not recorded"}</Text>
          {row("Pair", data.pair, true)}
          {data.contents !== "R" ? row("Left speaker", data.left) : null}
          {data.contents !== "L" ? row("Right speaker", data.right) : null}
          {row("Carton", data.carton)}
          <View style={{ marginTop: 4 }}>
            <Text style={{ fontSize: 8, color: SOFT_INK }}>Packed</Text>
            <Text style={{ fontSize: 11 }}>{formatPacked(data.packedOn)}</Text>
          </View>
          <View style={{ marginTop: 4 }}>
            <Text style={{ fontSize: 8, color: SOFT_INK }}>GTIN</Text>
            <Text style={{ fontFamily: MONO_FONT, fontSize: fitMono(data.gtin, columnPt, 11) }}>{data.gtin}</Text>
          </View>
          <View style={{ marginTop: "auto", borderWidth: 2, borderColor: INK, padding: 6 }}>
            <Text style={{ fontSize: 16, fontWeight: 700 }}>HEAVY</Text>
            <Text style={{ fontSize: 13, fontWeight: 700 }}>Two-person lift</Text>
            <Text style={{ fontSize: 9, marginTop: 3, lineHeight: 1.3 }}>Lift with two people or a lifting aid. Keep walkways clear.</Text>
          </View>
        </View>
        <View style={{ marginLeft: mm(GAP_MM), width: bars.widthPt, height: "100%", justifyContent: "center" }}>
          <Image src={{ data: bars.png, format: "png" }} style={{ width: bars.widthPt, height: bars.heightPt }} />
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
