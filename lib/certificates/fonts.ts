import { readFileSync } from "node:fs";
import path from "node:path";
import { inflateSync } from "node:zlib";
import { Font } from "@react-pdf/renderer";
import { registerPdfFonts } from "@/lib/labels/fonts";

/** The certificate's faces: the app's shipped Atkinson Hyperlegible and IBM Plex Mono, as plain TrueType. */
export const CERT_TEXT_FONT = "Twinleaf Certificate Text";
export const CERT_MONO_FONT = "Twinleaf Certificate Mono";

/**
 * WOFF 1.0 → sfnt (TrueType), in memory. Two faults of fontkit (in react-pdf 4.9.0) with the
 * shipped WOFF files make this worth its few lines:
 * - it inflates a WOFF table again on every read, so laying out one page inflated the glyph table
 *   for each glyph: about 100 ms of a 200 ms render went to zlib (measured with --cpu-prof);
 * - it reads the header of an empty glyph (the space) past the end of the inflated glyph table and
 *   throws "Offset is outside the bounds of the DataView", so mono text with a space failed.
 * In the sfnt every table lies in one buffer, in tag order, with the glyph table not last.
 * Layout: WOFF 1.0 (W3C Recommendation, 2012) §3–5; the OpenType table directory.
 */
export function woffToSfnt(woff: Buffer): Buffer {
  if (woff.readUInt32BE(0) !== 0x774f4646) throw new Error("not a WOFF 1.0 font");
  const flavor = woff.readUInt32BE(4);
  const numTables = woff.readUInt16BE(12);
  const tables = Array.from({ length: numTables }, (_, i) => {
    const at = 44 + 20 * i;
    const offset = woff.readUInt32BE(at + 4);
    const compLength = woff.readUInt32BE(at + 8);
    const origLength = woff.readUInt32BE(at + 12);
    const raw = woff.subarray(offset, offset + compLength);
    const data = compLength < origLength ? inflateSync(raw) : raw;
    if (data.length !== origLength) throw new Error("WOFF table has the wrong length after inflating");
    return { tag: woff.readUInt32BE(at), checksum: woff.readUInt32BE(at + 16), data };
  }).sort((a, b) => a.tag - b.tag);

  const pow2 = 2 ** Math.floor(Math.log2(numTables));
  const headerSize = 12 + 16 * numTables;
  const size = tables.reduce((n, t) => n + Math.ceil(t.data.length / 4) * 4, headerSize);
  const out = Buffer.alloc(size);
  out.writeUInt32BE(flavor, 0);
  out.writeUInt16BE(numTables, 4);
  out.writeUInt16BE(pow2 * 16, 6);
  out.writeUInt16BE(Math.log2(pow2), 8);
  out.writeUInt16BE(numTables * 16 - pow2 * 16, 10);
  let offset = headerSize;
  tables.forEach((t, i) => {
    const rec = 12 + 16 * i;
    out.writeUInt32BE(t.tag, rec);
    out.writeUInt32BE(t.checksum, rec + 4);
    out.writeUInt32BE(offset, rec + 8);
    out.writeUInt32BE(t.data.length, rec + 12);
    t.data.copy(out, offset);
    offset += Math.ceil(t.data.length / 4) * 4;
  });
  return out;
}

let registered = false;

/**
 * Registers the certificate's fonts once per process: read by path from the working directory
 * (the project root under `next start`, vitest and the scripts), converted, and handed to
 * react-pdf as data URLs. Also registers the label fonts, for their one hyphenation rule: a serial
 * is never split across lines.
 */
export function registerCertificateFonts(): void {
  if (registered) return;
  registerPdfFonts();
  const ttf = (name: string) => `data:font/ttf;base64,${woffToSfnt(readFileSync(path.join(process.cwd(), "public", "fonts", name))).toString("base64")}`;
  Font.register({
    family: CERT_TEXT_FONT,
    fonts: [
      { src: ttf("atkinson-hyperlegible-latin-400-normal.woff"), fontWeight: 400 },
      { src: ttf("atkinson-hyperlegible-latin-700-normal.woff"), fontWeight: 700 },
    ],
  });
  Font.register({
    family: CERT_MONO_FONT,
    fonts: [
      { src: ttf("ibm-plex-mono-latin-400-normal.woff"), fontWeight: 400 },
      { src: ttf("ibm-plex-mono-latin-600-normal.woff"), fontWeight: 600 },
    ],
  });
  registered = true;
}
