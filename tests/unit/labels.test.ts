import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";
import { tmpdir } from "node:os";
import path from "node:path";
import * as cdigit from "cdigit";
import sharp from "sharp";
import { beforeAll, describe, expect, test } from "vitest";
import { prepareZXingModule, readBarcodes, type ReaderOptions } from "zxing-wasm/reader";
import { AppError } from "@/lib/auth/errors";
import { LabelError, renderBarcode, type Symbology } from "@/lib/labels/barcodes";
import { renderLabelSheet, type LabelSpec } from "@/lib/labels/sheets";

// The oracle is ZXing-C++ (zxing-wasm), not bwip-js: a symbol counts as right only when an
// independent decoder reads back exactly what we encoded. Its .wasm normally comes from a CDN,
// so load the copy in node_modules.
beforeAll(async () => {
  const wasmPath = createRequire(import.meta.url).resolve("zxing-wasm/reader/zxing_reader.wasm");
  const wasm = readFileSync(wasmPath);
  await prepareZXingModule({
    overrides: { wasmBinary: wasm.buffer.slice(wasm.byteOffset, wasm.byteOffset + wasm.byteLength) as ArrayBuffer },
    fireImmediately: true,
  });
});

async function decode(png: Buffer, opts: ReaderOptions = {}) {
  return readBarcodes(new Uint8Array(png), { tryHarder: true, ...opts });
}

// GS1 mod-10 check digits, by cdigit (an independent implementation) pinned first to GS1's own
// worked example (docs/REFERENCES.md, § GS1: 629104150021 → 3).
const GTIN_DEMO = "1952773000100" + cdigit.gtin.compute("1952773000100"); // 952 is GS1's demo prefix
const GS1_TEXT = `(01)${GTIN_DEMO}(11)261201(21)K-PW2-26-00007-3`;

describe("GS1 check digits used as inputs", () => {
  test("cdigit agrees with GS1's worked example and the reference GTINs", () => {
    expect(cdigit.gtin.compute("629104150021")).toBe("3"); // GS1 General Specifications example
    expect(cdigit.gtin.validate("09521234543213")).toBe(true); // a valid GTIN-14 (docs/REFERENCES.md, § GS1)
    expect(cdigit.gtin.validate("09521234543214")).toBe(false);
    expect(GTIN_DEMO).toBe("19527730001001");
  });
});

describe("renderBarcode PNG decodes back to its text (oracle: zxing-wasm)", () => {
  test.each<[Symbology, string, string, string]>([
    // symbology, text, ZXing format, ZXing symbology identifier (ISO/IEC 15424: ]C0 plain Code 128)
    ["code128", "C-PW2-26-00042-Q", "Code128", "]C0"],
    ["datamatrix", "C-PW2-26-00042-Q", "DataMatrix", "]d1"],
    ["qrcode", "https://twinleaf.example/verify/7KQ2M9XW", "QRCode", "]Q1"],
  ])("%s %s", async (symbology, text, format, symbologyId) => {
    const png = await renderBarcode({ symbology, text, format: "png" });
    const [hit, ...rest] = await decode(png);
    expect(rest).toHaveLength(0);
    expect(hit?.format).toBe(format);
    expect(hit?.text).toBe(text);
    expect(hit?.symbologyIdentifier).toBe(symbologyId);
  });

  test("code128 with its human-readable line still decodes (text does not touch the bars)", async () => {
    const png = await renderBarcode({ symbology: "code128", text: "C-PW2-26-00042-Q", format: "png", includeText: true });
    const [hit] = await decode(png);
    expect(hit?.text).toBe("C-PW2-26-00042-Q");
  });

  // ZXing's HRI text mode gives the AI form "(01)…"; Plain mode gives the element string as
  // transmitted after FNC1, with GS (0x1D) ending a variable-length field that is not last.
  test.each([
    {
      text: GS1_TEXT,
      // (01) and (11) are fixed length and (21) is last, so no GS at all.
      plain: `01${GTIN_DEMO}11261201` + "21K-PW2-26-00007-3",
    },
    {
      // the element string example of docs/REFERENCES.md, § GS1, with the AI "01" its first field leaves out:
      // FNC1 01 09521234543213 17 100101 10 123ABC GS 21 1234567890.
      text: "(01)09521234543213(17)100101(10)123ABC(21)1234567890",
      plain: "0109521234543213" + "17100101" + "10123ABC" + "\x1d" + "211234567890",
    },
  ])("gs1-128 $text", async ({ text, plain }) => {
    const png = await renderBarcode({ symbology: "gs1-128", text, format: "png" });
    const [hri] = await decode(png, { textMode: "HRI" });
    expect(hri?.text).toBe(text);
    expect(hri?.contentType).toBe("GS1");
    expect(hri?.symbologyIdentifier).toBe("]C1"); // FNC1 in first position: GS1-128, not plain Code 128
    const [raw] = await decode(png, { textMode: "Plain" });
    expect(raw?.text).toBe(plain);
  });
});

describe("renderBarcode SVG", () => {
  // librsvg (through sharp) is a strict XML parser: it refuses malformed SVG, and the raster it
  // draws must decode with zxing-wasm, so the SVG is both well formed and the right symbol.
  test.each<[Symbology, string]>([
    ["code128", "C-PW2-26-00042-Q"],
    ["datamatrix", "C-PW2-26-00042-Q"],
    ["qrcode", "https://twinleaf.example/verify/7KQ2M9XW"],
    ["gs1-128", GS1_TEXT],
  ])("%s is well-formed SVG that decodes", async (symbology, text) => {
    const svg = renderBarcode({ symbology, text, format: "svg" });
    expect(svg).toMatch(/^<svg[^>]*xmlns="http:\/\/www\.w3\.org\/2000\/svg"/);
    expect(svg).toMatch(/<(path|rect)\b/);
    const png = await sharp(Buffer.from(svg), { density: 144 }).png().toBuffer();
    const [hit] = await decode(png);
    expect(hit?.text).toBe(text);
  });

  test("the SVG check itself rejects a malformed document", async () => {
    const svg = renderBarcode({ symbology: "code128", text: "C-PW2-26-00042-Q", format: "svg" });
    await expect(sharp(Buffer.from(svg.replace("</svg>", ""))).png().toBuffer()).rejects.toThrow();
  });
});

describe("renderBarcode refuses bad data with a LabelError", () => {
  // bwip-js lints GS1 data: a wrong (01) check digit must not become a printed label.
  test("bad GTIN check digit (09521234543214), PNG and SVG", async () => {
    const text = "(01)09521234543214(21)K-PW2-26-00007-3";
    const err = await renderBarcode({ symbology: "gs1-128", text, format: "png" }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(LabelError);
    expect(err).toBeInstanceOf(AppError);
    expect((err as LabelError).status).toBe(422);
    expect((err as LabelError).message).toMatch(/check digit/);
    expect((err as LabelError).message).not.toMatch(/bwipp|#\d+/); // no library internals for the user
    expect(() => renderBarcode({ symbology: "gs1-128", text, format: "svg" })).toThrow(LabelError);
  });

  test.each([
    ["gs1-128", "(01)09521234543213(21)A#B", /CSET 82/], // # is outside CSET 82
    ["gs1-128", "09521234543213", /GS1 data/], // not in AI form
    ["code128", "", /needs some text/],
  ] as const)("%s %j", async (symbology, text, message) => {
    await expect(renderBarcode({ symbology, text, format: "png" })).rejects.toThrow(message);
  });
});

// One entry per page object: "/Type /Page" (the page tree root is "/Type /Pages" and must not
// count), with that object's MediaBox. react-pdf (pdfkit) writes page dictionaries uncompressed.
function pdfPages(pdf: Buffer): number[][] {
  const objects = pdf.toString("latin1").match(/\d+ \d+ obj\b.*?\bendobj/gs) ?? [];
  return objects
    .filter((obj) => /\/Type\s*\/Page(?![A-Za-z])/.test(obj))
    .map((obj) => {
      const box = /\/MediaBox\s*\[\s*([-\d.\s]+)\]/.exec(obj);
      if (!box?.[1]) throw new Error("page without a MediaBox");
      return box[1].trim().split(/\s+/).map(Number);
    });
}

function specs(n: number, symbology: Symbology = "code128"): LabelSpec[] {
  return Array.from({ length: n }, (_, i) => {
    const serial = `C-PW2-26-${String(42 + i).padStart(5, "0")}-Q`;
    return {
      title: i % 2 ? "Cabinet · right" : "Cabinet · left",
      serial,
      lines: ["Demo model", "Demo finish", `Flitch F-${100 + i}`],
      barcode: { symbology, text: serial },
    };
  });
}

const PT = 72 / 25.4;

describe("renderLabelSheet", () => {
  test("the page counter sees /Page and not /Pages", () => {
    const fake = Buffer.from(
      "1 0 obj << /Type /Pages /Kids [2 0 R] /MediaBox [0 0 1 1] >> endobj 2 0 obj << /Type /Page /MediaBox [0 0 10 20] >> endobj",
      "latin1",
    );
    expect(pdfPages(fake)).toEqual([[0, 0, 10, 20]]);
  });

  test("A4 3×8: 30 labels on 2 A4 pages (595.28 × 841.89 pt, ISO 216)", async () => {
    const pdf = await renderLabelSheet(specs(30), "a4-3x8");
    expect(pdf.subarray(0, 5).toString()).toBe("%PDF-");
    const pages = pdfPages(pdf);
    expect(pages).toHaveLength(2);
    for (const [x0, y0, w, h] of pages) {
      expect([x0, y0]).toEqual([0, 0]);
      expect(w).toBeCloseTo(595.28, 2);
      expect(h).toBeCloseTo(841.89, 2);
    }
  });

  test.each([
    [24, 0, 1], // exactly one full sheet
    [25, 0, 2],
    [30, 20, 3], // 4 cells left on the part-used sheet, then 26 more
    [4, 20, 1], // fills the last four cells exactly
    [5, 20, 2],
  ])("A4: %i labels starting at cell %i → %i pages", async (n, startAt, expected) => {
    expect(pdfPages(await renderLabelSheet(specs(n), "a4-3x8", { startAt }))).toHaveLength(expected);
  });

  test("thermal: 3 labels on 3 pages of 100 × 50 mm (283.46 × 141.73 pt)", async () => {
    const pages = pdfPages(await renderLabelSheet(specs(3, "datamatrix"), "thermal-100x50"));
    expect(pages).toHaveLength(3);
    for (const [, , w, h] of pages) {
      expect(w).toBeCloseTo(100 * PT, 2);
      expect(h).toBeCloseTo(50 * PT, 2);
      expect(w).toBeCloseTo(283.46, 2);
      expect(h).toBeCloseTo(141.73, 2);
    }
  });

  test.each([[-1], [24], [1.5]])("A4 refuses startAt %d", async (startAt) => {
    await expect(renderLabelSheet(specs(1), "a4-3x8", { startAt })).rejects.toThrow(LabelError);
  });

  test("no labels is an error, not an empty PDF", async () => {
    await expect(renderLabelSheet([], "a4-3x8")).rejects.toThrow(LabelError);
  });

  test("bad GS1 data on a label surfaces as LabelError", async () => {
    const [label] = specs(1);
    const bad = { ...label!, barcode: { symbology: "gs1-128" as const, text: "(01)09521234543214" } };
    await expect(renderLabelSheet([bad], "thermal-100x50")).rejects.toThrow(/check digit/);
  });

  // 396 modules with quiet zones need 2 dots each (0.25 mm) at 203 dpi: 99 mm, more than the
  // 92 mm inside a 100 mm label. At 300 dpi, 2 dots are 0.17 mm and it fits.
  test("a GS1-128 too long for 203 dpi is refused, and fits at 300 dpi", async () => {
    const carton: LabelSpec = { title: "Carton", serial: "K-PW2-26-00007-3", barcode: { symbology: "gs1-128", text: GS1_TEXT } };
    await expect(renderLabelSheet([carton], "thermal-100x50")).rejects.toThrow(/too long .* 203 dpi/);
    expect(pdfPages(await renderLabelSheet([carton], "thermal-100x50", { printerDpi: 300 }))).toHaveLength(1);
  });
});

// The printed page, not just the PNG: rasterise the PDF with poppler and decode every label on it,
// which fails if text, the rule or the cell edge crowds a quiet zone. Needs poppler-utils.
const hasPdftoppm = spawnSync("pdftoppm", ["-v"]).status === 0;

describe.skipIf(!hasPdftoppm)("printed labels decode from the rasterised PDF (poppler + zxing-wasm)", () => {
  const DPI = 300;

  async function decodePdf(pdf: Buffer) {
    const dir = mkdtempSync(path.join(tmpdir(), "twinleaf-labels-"));
    try {
      const file = path.join(dir, "labels.pdf");
      writeFileSync(file, pdf);
      execFileSync("pdftoppm", ["-png", "-r", String(DPI), file, path.join(dir, "page")]);
      const pngs = readdirSync(dir).filter((f) => f.endsWith(".png")).sort();
      return Promise.all(pngs.map((f) => decode(readFileSync(path.join(dir, f)), { textMode: "HRI" })));
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  }

  test("an A4 sheet of mixed symbologies, started at cell 2: each decodes inside its own cell", async () => {
    const kinds: Symbology[] = ["code128", "datamatrix", "qrcode"];
    const labels = specs(12).map((l, i) => {
      const symbology = kinds[i % 3]!;
      return { ...l, barcode: { symbology, text: symbology === "qrcode" ? `https://twinleaf.example/v/${l.serial}` : l.serial } };
    });
    labels.push({
      title: "Carton",
      serial: "K-PW2-26-00007-3",
      barcode: { symbology: "gs1-128", text: `(01)${GTIN_DEMO}(21)K-PW2-26-00007-3` },
    });
    const startAt = 2;
    const [page, ...more] = await decodePdf(await renderLabelSheet(labels, "a4-3x8", { startAt }));
    expect(more).toHaveLength(0);
    expect(page!.map((r) => r.text).sort()).toEqual(labels.map((l) => l.barcode.text).sort());

    // 70 × 37 mm cells, three across from x = 0, eight down centred on 297 mm (0.5 mm margins).
    const pxPerMm = DPI / 25.4;
    labels.forEach((label, i) => {
      const hit = page!.find((r) => r.text === label.barcode.text)!;
      const { topLeft, bottomRight } = hit.position;
      const cx = (topLeft.x + bottomRight.x) / 2 / pxPerMm;
      const cy = (topLeft.y + bottomRight.y) / 2 / pxPerMm;
      const cell = startAt + i;
      const [col, row] = [cell % 3, Math.floor(cell / 3)];
      expect(cx, label.barcode.text).toBeGreaterThan(col * 70);
      expect(cx, label.barcode.text).toBeLessThan((col + 1) * 70);
      expect(cy, label.barcode.text).toBeGreaterThan(0.5 + row * 37);
      expect(cy, label.barcode.text).toBeLessThan(0.5 + (row + 1) * 37);
    });
  });

  test("thermal labels at 203 dpi, one symbol per page", async () => {
    const labels: LabelSpec[] = [
      ...specs(1, "code128"),
      ...specs(1, "datamatrix"),
      { title: "Carton", serial: "K-PW2-26-00007-3", barcode: { symbology: "gs1-128", text: `(01)${GTIN_DEMO}(21)K-PW2-26-00007-3` } },
    ];
    const pages = await decodePdf(await renderLabelSheet(labels, "thermal-100x50"));
    expect(pages.map((hits) => hits.map((r) => r.text))).toEqual(labels.map((l) => [l.barcode.text]));
  });
});
