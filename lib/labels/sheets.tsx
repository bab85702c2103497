import { Document, Image, Page, Text, View, renderToBuffer } from "@react-pdf/renderer";
import {
  LabelError,
  barcodeGeometry,
  isLinear,
  renderBarcode,
  type Symbology,
} from "./barcodes";
import { MONO_FONT, TEXT_FONT, registerPdfFonts } from "./fonts";

export { LabelError } from "./barcodes";

export interface LabelSpec {
  /** e.g. "Cabinet · left" */
  title: string;
  /** Printed large in the mono face. */
  serial: string;
  /** Model, finish, flitch…; joined with " · " and kept to one or two lines. */
  lines?: string[];
  barcode: { symbology: Symbology; text: string };
}

export type SheetLayout = "a4-3x8" | "thermal-100x50";

export const SHEET_LAYOUTS: readonly SheetLayout[] = ["a4-3x8", "thermal-100x50"];

const PT_PER_MM = 72 / 25.4;
const mm = (v: number) => v * PT_PER_MM;

const LEAF = "#2e6a57";
const INK = "#1c2421";
const SOFT_INK = "#46524d";

/** IBM Plex Mono advances every glyph 600/1000 em, so a line's width is known before layout. */
const MONO_ADVANCE = 0.6;

/**
 * Printed module size, snapped to whole printer dots so every bar of one width prints the same
 * number of dots (a module of 1.5 dots alternates between 1 and 2, and scanners miss). Linear:
 * at most 0.38 mm (3 dots at 203 dpi), at least 0.165 mm and 2 dots (2 dots at 300 dpi). 2D: at
 * least 0.25 mm, at most the layout's `matrixX`. Common practice for small labels, no published source.
 */
const X_LINEAR = { max: 0.38, min: 0.165 };
const MIN_DOTS = 2;

interface Geometry {
  pageMm: [number, number];
  cols: number;
  rows: number;
  cellMm: [number, number];
  /** Inside each cell; 4 mm at the sides keeps the outer columns clear of a laser's unprintable edge. */
  padMm: [number, number];
  titlePt: number;
  serialPt: number;
  linePt: number;
  hriPt: number;
  maxLines: number;
  barHeightMm: number;
  /** Largest side of a 2D symbol, and its largest module. */
  matrixMm: number;
  matrixX: number;
  /** Printer resolution assumed when none is given: office lasers for sheets, thermal printers for rolls. */
  dpi: number;
  label: string;
}

const GEOMETRY: Record<SheetLayout, Geometry> = {
  // 24 labels of 70 × 37 mm, three across with no side margin, grid centred top to bottom.
  "a4-3x8": {
    pageMm: [210, 297],
    cols: 3,
    rows: 8,
    cellMm: [70, 37],
    padMm: [4, 3],
    titlePt: 8,
    serialPt: 12,
    linePt: 7.5,
    hriPt: 6.5,
    maxLines: 2,
    barHeightMm: 9,
    matrixMm: 23,
    matrixX: 0.75,
    dpi: 600,
    label: "70 × 37 mm label",
  },
  "thermal-100x50": {
    pageMm: [100, 50],
    cols: 1,
    rows: 1,
    cellMm: [100, 50],
    padMm: [4, 3.5],
    titlePt: 10,
    serialPt: 18,
    linePt: 9,
    hriPt: 8,
    maxLines: 2,
    barHeightMm: 14,
    matrixMm: 36,
    matrixX: 1,
    dpi: 203,
    label: "100 × 50 mm label",
  },
};

interface PlacedBarcode {
  png: Buffer;
  widthPt: number;
  heightPt: number;
  /** Human-readable text under a linear symbol, when it is not already the serial. */
  hri: string | null;
}

interface PreparedLabel {
  spec: LabelSpec;
  barcode: PlacedBarcode;
}

/**
 * Renders label PDFs. `a4-3x8`: A4 sheets of 24 cells (70 × 37 mm, 3 × 8), filled row by row;
 * `startAt` skips that many cells on the first sheet so a part-used sheet can go back in.
 * `thermal-100x50`: one 100 × 50 mm page per label (`startAt` is ignored).
 * `printerDpi` (default 600 for A4 sheets, 203 for thermal) sets the dot grid that bar widths
 * snap to; give 300 for a 300-dpi thermal printer, which fits longer GS1 data.
 * Throws `LabelError` (status 422) for bad barcode data, or data too long for the layout.
 */
export async function renderLabelSheet(
  labels: LabelSpec[],
  layout: SheetLayout,
  opts: { startAt?: number; printerDpi?: number } = {},
): Promise<Buffer> {
  const g = GEOMETRY[layout];
  if (!g) throw new LabelError(`Unknown label layout "${String(layout)}".`);
  if (labels.length === 0) throw new LabelError("There are no labels to print.");
  const perPage = g.cols * g.rows;
  const startAt = perPage === 1 ? 0 : (opts.startAt ?? 0);
  if (!Number.isInteger(startAt) || startAt < 0 || startAt >= perPage) {
    throw new LabelError(`Start position must be a whole number from 0 to ${perPage - 1}.`);
  }

  const dpi = opts.printerDpi ?? g.dpi;
  if (!Number.isFinite(dpi) || dpi < 150 || dpi > 2400) {
    throw new LabelError("Printer resolution must be between 150 and 2400 dpi.");
  }

  registerPdfFonts();
  const prepared = await Promise.all(labels.map((spec) => prepare(spec, g, dpi)));

  const pages: PreparedLabel[][] = [];
  prepared.forEach((label, i) => {
    const cell = startAt + i;
    (pages[Math.floor(cell / perPage)] ??= []).push(label);
  });

  const [pageW, pageH] = g.pageMm;
  const [cellW, cellH] = g.cellMm;
  const marginX = (pageW - g.cols * cellW) / 2;
  const marginY = (pageH - g.rows * cellH) / 2;

  const doc = (
    <Document title="Twinleaf labels" creator="Twinleaf" producer="Twinleaf">
      {pages.map((onPage, p) => {
        const offset = p === 0 ? startAt : 0;
        return (
          <Page key={p} size={[mm(pageW), mm(pageH)]} style={{ fontFamily: TEXT_FONT, color: INK }}>
            {onPage.map((label, i) => {
              const cell = offset + i;
              const col = cell % g.cols;
              const row = Math.floor(cell / g.cols);
              return (
                <View
                  key={cell}
                  style={{
                    position: "absolute",
                    left: mm(marginX + col * cellW),
                    top: mm(marginY + row * cellH),
                    width: mm(cellW),
                    height: mm(cellH),
                    paddingHorizontal: mm(g.padMm[0]),
                    paddingVertical: mm(g.padMm[1]),
                    overflow: "hidden",
                  }}
                >
                  <Label label={label} g={g} />
                </View>
              );
            })}
          </Page>
        );
      })}
    </Document>
  );
  return renderToBuffer(doc);
}

/**
 * Module size in whole dots: the largest that fits `spaceMm` and `maxMm`, or null when that is
 * under the minimum. The PNG is drawn with one pixel per dot, so placing it at the printer's
 * resolution maps pixels to dots one to one.
 */
function dotsPerModule(modules: number, spaceMm: number, x: { max: number; min: number }, dpi: number): number | null {
  const dotsPerMm = dpi / 25.4;
  const k = Math.floor(Math.min(x.max * dotsPerMm, (spaceMm * dotsPerMm) / modules));
  return k >= MIN_DOTS && k / dotsPerMm >= x.min ? k : null;
}

async function prepare(spec: LabelSpec, g: Geometry, dpi: number): Promise<PreparedLabel> {
  const { symbology, text } = spec.barcode;
  const where = `Label "${spec.title} ${spec.serial}"`;
  const geo = await barcodeGeometry(symbology, text);
  const contentW = g.cellMm[0] - 2 * g.padMm[0];
  const mmPerDot = 25.4 / dpi;

  if (isLinear(symbology)) {
    const k = dotsPerModule(geo.modulesWide, contentW, X_LINEAR, dpi);
    if (k === null) {
      const fits = Math.min(X_LINEAR.max, contentW / geo.modulesWide);
      const least = Math.max(X_LINEAR.min, MIN_DOTS * mmPerDot);
      throw new LabelError(
        `${where}: the barcode is too long for a ${g.label} at ${dpi} dpi. Its narrowest bar would be ` +
          `${fits.toFixed(2)} mm, under the ${least.toFixed(2)} mm that prints reliably. ` +
          `Use a larger label, a finer printer or shorter data.`,
      );
    }
    const x = k * mmPerDot;
    // bwip-js draws a linear module as one unit, so scale k gives k pixels per module.
    const png = await renderBarcode({
      symbology,
      text,
      format: "png",
      scale: k,
      barHeightModules: Math.round(g.barHeightMm / x),
    });
    const hri = symbology === "gs1-128" || text !== spec.serial ? text : null;
    return { spec, barcode: { png, widthPt: mm(geo.modulesWide * x), heightPt: mm(g.barHeightMm), hri } };
  }

  const high = geo.modulesHigh ?? geo.modulesWide;
  const k = dotsPerModule(Math.max(geo.modulesWide, high), g.matrixMm, { max: g.matrixX, min: 0.25 }, dpi);
  if (k === null) {
    throw new LabelError(`${where}: the data is too long for a 2D code on a ${g.label}. Shorten the text.`);
  }
  const x = k * mmPerDot;
  // A 2D module is two bwip-js units, so scale k gives 2k pixels per module: finer than the dots, harmless.
  const png = await renderBarcode({ symbology, text, format: "png", scale: k });
  return { spec, barcode: { png, widthPt: mm(geo.modulesWide * x), heightPt: mm(high * x), hri: null } };
}

/** Largest size up to `max` at which a mono line fits `widthPt`; never under 6 pt. */
function fitMono(text: string, widthPt: number, max: number): number {
  return Math.max(6, Math.min(max, widthPt / (MONO_ADVANCE * Math.max(1, text.length))));
}

function Label({ label, g }: { label: PreparedLabel; g: Geometry }) {
  const { spec, barcode } = label;
  const contentW = mm(g.cellMm[0] - 2 * g.padMm[0]);
  const image = (
    <Image src={{ data: barcode.png, format: "png" }} style={{ width: barcode.widthPt, height: barcode.heightPt }} />
  );

  if (isLinear(spec.barcode.symbology)) {
    return (
      <View style={{ flexDirection: "column", height: "100%" }}>
        <Heading spec={spec} g={g} widthPt={contentW} />
        <View style={{ marginTop: "auto", paddingTop: mm(1), alignItems: "center" }}>
          {image}
          {barcode.hri && (
            <Text
              style={{
                fontFamily: MONO_FONT,
                fontSize: fitMono(barcode.hri, barcode.widthPt, g.hriPt),
                marginTop: 1.5,
                color: INK,
              }}
            >
              {barcode.hri}
            </Text>
          )}
        </View>
      </View>
    );
  }

  const gap = mm(3);
  // An explicit width: a flex child's text would otherwise lay out at the cell's full width and run off it.
  const textW = contentW - barcode.widthPt - gap;
  return (
    <View style={{ flexDirection: "row", height: "100%", alignItems: "center" }}>
      {image}
      <View style={{ marginLeft: gap, width: textW, height: "100%" }}>
        <Heading spec={spec} g={g} widthPt={textW} />
      </View>
    </View>
  );
}

function Heading({ spec, g, widthPt }: { spec: LabelSpec; g: Geometry; widthPt: number }) {
  // A no-break space ties each dot to the item before it, so no wrapped line starts with one.
  const lines = (spec.lines ?? [])
    .filter((l) => l.trim() !== "")
    .map((l) => l.replace(/ ·/g, "\u00a0·"))
    .join("\u00a0· ");
  return (
    <View>
      <Text style={{ fontSize: g.titlePt, fontWeight: 700, maxLines: 1, textOverflow: "ellipsis" }}>
        {spec.title}
      </Text>
      <View style={{ borderBottomWidth: 0.6, borderBottomColor: LEAF, marginTop: 1.5, marginBottom: 2.5 }} />
      <Text style={{ fontFamily: MONO_FONT, fontWeight: 600, fontSize: fitMono(spec.serial, widthPt, g.serialPt) }}>
        {spec.serial}
      </Text>
      {lines !== "" && (
        <Text
          style={{
            fontSize: g.linePt,
            color: SOFT_INK,
            marginTop: 2,
            lineHeight: 1.25,
            maxLines: g.maxLines,
            textOverflow: "ellipsis",
          }}
        >
          {lines}
        </Text>
      )}
    </View>
  );
}
