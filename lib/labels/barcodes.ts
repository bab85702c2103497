import { toBuffer, toSVG, type RenderOptions } from "bwip-js/node";
import { AppError } from "@/lib/auth/errors";

export type Symbology = "code128" | "datamatrix" | "gs1-128" | "qrcode";

export const SYMBOLOGIES: readonly Symbology[] = ["code128", "datamatrix", "gs1-128", "qrcode"];

const NAMES: Record<Symbology, string> = {
  code128: "Code 128",
  "gs1-128": "GS1-128",
  datamatrix: "Data Matrix",
  qrcode: "QR code",
};

/**
 * Light margin each side, in modules. Code 128 / GS1-128 need 10X (ISO/IEC 15417); QR needs 4X
 * (ISO/IEC 18004); Data Matrix needs 1X (ISO/IEC 16022), we give 2X because labels sit close
 * to text and to the die-cut edge.
 */
export const QUIET_ZONE_MODULES: Record<Symbology, number> = {
  code128: 10,
  "gs1-128": 10,
  datamatrix: 2,
  qrcode: 4,
};

export function isLinear(symbology: Symbology): boolean {
  return symbology === "code128" || symbology === "gs1-128";
}

/** bwip-js draws a linear module as 1 unit and a 2D module as 2 units at scale 1; padding is in units. */
const unitsPerModule = (s: Symbology) => (isLinear(s) ? 1 : 2);

/** bwip-js takes a linear bar height in millimetres at 72 units per inch (1 unit = 25.4/72 mm). */
const MM_PER_UNIT = 25.4 / 72;

/** A failure to make a label or barcode, with a message fit to show the person printing it. */
export class LabelError extends AppError {
  constructor(message: string) {
    super(422, message);
    this.name = "LabelError";
  }
}

export interface BarcodeOptions {
  symbology: Symbology;
  /** The data. For gs1-128, bwip-js's AI form: `(01)09521234543213(21)ABC`. */
  text: string;
  format: "png" | "svg";
  /** Pixels (PNG) or SVG units per module; default 3. Integer values keep bar edges crisp. */
  scale?: number;
  /** Print the human-readable text under a linear symbol (ignored for 2D); default false. */
  includeText?: boolean;
  /**
   * Linear only: bar height in modules. Default: 15% of the symbol's width, at least 30 modules
   * (the usual Code 128 guidance, so a hand scanner's line crosses the bars even when tilted).
   */
  barHeightModules?: number;
}

/** Size of a symbol in modules, quiet zones included; a linear symbol's height is the layout's choice. */
export interface BarcodeGeometry {
  modulesWide: number;
  /** Null for linear symbols. */
  modulesHigh: number | null;
}

/**
 * Renders a barcode with bwip-js. PNG resolves to a Buffer (white background, quiet zones
 * included); SVG returns a string synchronously. Bad data throws `LabelError` (an AppError
 * with status 422), so a route handler can pass it straight to the user.
 */
export function renderBarcode(opts: BarcodeOptions & { format: "png" }): Promise<Buffer>;
export function renderBarcode(opts: BarcodeOptions & { format: "svg" }): string;
export function renderBarcode(opts: BarcodeOptions): Promise<Buffer> | string;
export function renderBarcode(opts: BarcodeOptions): Promise<Buffer> | string {
  if (opts.format === "svg") {
    const bwip = bwipOptions(opts);
    try {
      return toSVG(bwip);
    } catch (e) {
      throw toLabelError(opts, e);
    }
  }
  return renderPng(opts);
}

// Async throughout, so every PNG failure arrives as a rejection, never a synchronous throw.
async function renderPng(opts: BarcodeOptions): Promise<Buffer> {
  const bwip = bwipOptions(opts);
  try {
    return await toBuffer(bwip);
  } catch (e) {
    throw toLabelError(opts, e);
  }
}

/**
 * The symbol's size in modules (quiet zones included), so a layout can choose the printed
 * module size. Throws `LabelError` on bad data, like renderBarcode.
 */
export async function barcodeGeometry(symbology: Symbology, text: string): Promise<BarcodeGeometry> {
  // At scale 1 one bwip-js unit is one pixel, so the PNG header (IHDR width, height) gives the size.
  const png = await renderBarcode({ symbology, text, format: "png", scale: 1, barHeightModules: 1 });
  const upm = unitsPerModule(symbology);
  return {
    modulesWide: png.readUInt32BE(16) / upm,
    modulesHigh: isLinear(symbology) ? null : png.readUInt32BE(20) / upm,
  };
}

function bwipOptions(opts: BarcodeOptions): RenderOptions {
  const { symbology, text } = opts;
  if (!SYMBOLOGIES.includes(symbology)) throw new LabelError(`Unknown barcode type "${String(symbology)}".`);
  if (text.trim() === "") throw new LabelError(`A ${NAMES[symbology]} barcode needs some text to encode.`);
  const scale = opts.scale ?? 3;
  if (!Number.isInteger(scale) || scale < 1 || scale > 20) {
    throw new LabelError("Barcode scale must be a whole number from 1 to 20.");
  }
  const quiet = QUIET_ZONE_MODULES[symbology] * unitsPerModule(symbology);
  const base: RenderOptions = {
    bcid: symbology,
    text,
    scale,
    backgroundcolor: "FFFFFF",
    paddingwidth: quiet,
    paddingheight: isLinear(symbology) ? 0 : quiet,
  };
  if (!isLinear(symbology)) return base;
  return {
    ...base,
    // Left to bwip-js's default, height would be 10 mm at 72 dpi whatever the symbol's length.
    height: (opts.barHeightModules ?? defaultBarHeight(text, symbology)) * MM_PER_UNIT,
    includetext: opts.includeText ?? false,
    textxalign: "center",
    textsize: 8,
    textgaps: 1,
  };
}

/** Rough module count of a Code 128 symbol: enough to size the default bar height. */
function defaultBarHeight(text: string, symbology: Symbology): number {
  const approxModules = 35 + 11 * text.length + 2 * QUIET_ZONE_MODULES[symbology];
  return Math.max(30, Math.round(0.15 * approxModules));
}

/** bwip-js errors read "bwipp.GS1badChecksum#3251: AI 01: Bad checksum": keep the part after the code. */
function toLabelError(opts: BarcodeOptions, e: unknown): LabelError {
  const raw = e instanceof Error ? e.message : String(e);
  const m = /^(?:bwipp|bwip-js)\.?(\w*)(?:#\d+)?:\s*(.*)$/s.exec(raw);
  const code = m?.[1] ?? "";
  const detail = (m?.[2] ?? raw).trim().replace(/\.$/, "");
  if (code.startsWith("GS1")) {
    const friendly = code === "GS1badChecksum" ? `${detail.replace(/:.*$/, "")}: the check digit is wrong` : detail;
    return new LabelError(`The GS1 data "${opts.text}" is not valid (${friendly}). Check the GTIN and the other fields.`);
  }
  return new LabelError(`Cannot make a ${NAMES[opts.symbology]} barcode from "${opts.text}": ${detail}.`);
}
