/** GS1 Digital Link URIs and reading a scanned code (docs/REFERENCES.md, § GS1). */
import { isValidGtin } from "@/lib/serials/gs1";

const RESOLVER = "https://id.gs1.org";

/**
 * A GS1 Digital Link URI on GS1's own resolver: `/01/{gtin}/21/{serial}`, `/01/{gtin}/10/{lot}`,
 * `/00/{sscc}`, `/414/{gln}`. A GTIN is written as 14 digits; values are percent-encoded.
 */
export function digitalLink(key: { gtin: string; serial?: string; lot?: string } | { sscc: string } | { gln: string }): string {
  if ("sscc" in key) return `${RESOLVER}/00/${key.sscc}`;
  if ("gln" in key) return `${RESOLVER}/414/${key.gln}`;
  const gtin = key.gtin.padStart(14, "0");
  if (key.serial !== undefined) return `${RESOLVER}/01/${gtin}/21/${encodeURIComponent(key.serial)}`;
  if (key.lot !== undefined) return `${RESOLVER}/01/${gtin}/10/${encodeURIComponent(key.lot)}`;
  return `${RESOLVER}/01/${gtin}`;
}

/**
 * The GTIN a scan carries, as 14 digits: a bare GTIN-8/12/13/14 (an EAN-13 on a box), or the
 * (01) element of a GS1 barcode as a scanner sends it ("01…", with or without the "]C1"/"]d2"
 * symbology prefix) or as printed ("(01)…"). Null when it carries none with a right check digit.
 */
export function scannedGtin(scan: string): string | null {
  const t = scan.trim().replace(/^\][A-Za-z][0-9]/, "");
  const element = /^\(01\)\s*([0-9]{14})/.exec(t) ?? /^01([0-9]{14})/.exec(t);
  const digits = element ? element[1]! : /^[0-9]+$/.test(t) ? t : null;
  if (!digits || !isValidGtin(digits)) return null;
  return digits.padStart(14, "0");
}

/**
 * Whether a scan is the code a packing line expects: the same GTIN however it was carried, or,
 * for a code of the workshop's own, the same text ignoring case and outer spaces.
 */
export function sameScannedCode(expected: string, scan: string): boolean {
  const want = scannedGtin(expected);
  if (want) return scannedGtin(scan) === want;
  return expected.trim().toUpperCase() === scan.trim().toUpperCase() && expected.trim() !== "";
}
