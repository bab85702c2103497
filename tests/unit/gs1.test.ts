import * as cdigit from "cdigit";
import { describe, expect, test } from "vitest";
import { checkGs1Settings, digitalLink, formatSscc, isValidSscc, sameScannedCode, scannedGtin, ssccHri, DEMO_COMPANY_PREFIX } from "@/lib/gs1";
import { seededRandom } from "../fixtures/random";

const DEMO_FIRST = `0${DEMO_COMPANY_PREFIX}000000001`;

describe("SSCC (AI 00)", () => {
  test.each([
    // GS1 General Specifications' SSCC example (docs/REFERENCES.md, § GS1): 0 0614141 123456789 → check 0.
    [{ extension: 0, companyPrefix: "0614141", serialReference: 123456789 }, "006141411234567890", "(00) 0 0614141 123456789 0"],
    // The demo's first carton: extension 0, demo prefix, reference 1; check digit by cdigit (docs/REFERENCES.md, § Independent libraries).
    [{ extension: 0, companyPrefix: DEMO_COMPANY_PREFIX, serialReference: 1 }, `${DEMO_FIRST}${cdigit.gtin.compute(DEMO_FIRST)}`, `(00) 0 ${DEMO_COMPANY_PREFIX} 000000001 ${cdigit.gtin.compute(DEMO_FIRST)}`],
  ])("%o → %s", (parts, sscc, hri) => {
    expect(formatSscc(parts)).toBe(sscc);
    expect(isValidSscc(sscc)).toBe(true);
    expect(ssccHri(sscc, parts.companyPrefix.length)).toBe(hri);
  });

  test("random parts: the check digit agrees with cdigit's GS1 mod-10, and a changed digit is caught", () => {
    const rng = seededRandom(2_026_120_5);
    for (let n = 0; n < 500; n++) {
      const len = 7 + Math.floor(rng() * 4);
      const companyPrefix = Array.from({ length: len }, () => Math.floor(rng() * 10)).join("");
      const serialReference = Math.floor(rng() * 10 ** (16 - len));
      const sscc = formatSscc({ extension: Math.floor(rng() * 10), companyPrefix, serialReference });
      expect(sscc).toHaveLength(18);
      // cdigit's GTIN algorithm is GS1's mod-10, which serves every GS1 key length (docs/REFERENCES.md, § Independent libraries).
      expect(cdigit.gtin.validate(sscc), sscc).toBe(true);
      const i = Math.floor(rng() * 17);
      const broken = sscc.slice(0, i) + String((Number(sscc[i]) + 1) % 10) + sscc.slice(i + 1);
      expect(isValidSscc(broken), broken).toBe(false);
    }
  });

  test.each([
    [{ extension: 10, companyPrefix: "9527730", serialReference: 1 }, /extension digit is 0 to 9/],
    [{ extension: 0, companyPrefix: "95277", serialReference: 1 }, /7 to 10 digits/],
    [{ extension: 0, companyPrefix: "9527730123", serialReference: 1_000_000 }, /serial reference is 0 to 999999/],
  ])("refuses parts that do not fit: %o", (parts, message) => {
    expect(() => formatSscc(parts)).toThrow(message);
  });
});

describe("the workshop's GS1 settings", () => {
  test.each([
    [{}, { companyPrefix: DEMO_COMPANY_PREFIX, extension: 0, demo: true, gln: null }],
    [{ TWINLEAF_GS1_COMPANY_PREFIX: " 0614141 ", TWINLEAF_SSCC_EXTENSION: "3" }, { companyPrefix: "0614141", extension: 3, demo: false, gln: null }],
    // A GLN with a right check digit: 0614141 00001 9 (GS1's example GLN, from memory; check digit confirmed by cdigit below).
    [{ TWINLEAF_GLN: "0614141000012" }, { companyPrefix: DEMO_COMPANY_PREFIX, extension: 0, demo: true, gln: "0614141000012" }],
  ])("%o reads as %o", (env, settings) => {
    expect(checkGs1Settings(env)).toEqual({ ok: true, settings });
  });

  test("the example GLN's check digit is right by cdigit", () => {
    expect(cdigit.gtin.validate("0614141000012")).toBe(true);
  });

  test.each([
    [{ TWINLEAF_GS1_COMPANY_PREFIX: "12345" }, /TWINLEAF_GS1_COMPANY_PREFIX is "12345"/],
    [{ TWINLEAF_GS1_COMPANY_PREFIX: "95277301234" }, /7 to 10 digits/],
    [{ TWINLEAF_SSCC_EXTENSION: "12" }, /TWINLEAF_SSCC_EXTENSION is "12"/],
    [{ TWINLEAF_GLN: "0614141000013" }, /TWINLEAF_GLN is "0614141000013"/],
  ])("%o is refused in words", (env, message) => {
    const r = checkGs1Settings(env);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.problems.join(" ")).toMatch(message);
  });
});

describe("scanned codes and Digital Link URIs", () => {
  test.each([
    // GTIN-14 09527730009017 (invented, demo prefix) however a scanner or a person sends it.
    ["09527730009017", "09527730009017"],
    ["9527730009017", "09527730009017"],
    ["(01)09527730009017", "09527730009017"],
    ["0109527730009017", "09527730009017"],
    ["]C10109527730009017", "09527730009017"],
    ["09527730009018", null], // check digit off by one
    ["grilles", null],
  ])("scannedGtin(%s) = %s", (scan, gtin) => {
    expect(scannedGtin(scan)).toBe(gtin);
  });

  test.each([
    ["09527730009017", "(01)09527730009017", true],
    ["09527730009017", "09527730009000", false],
    ["TW-GRILLE", " tw-grille ", true],
    ["TW-GRILLE", "TW-GRILLES", false],
  ])("sameScannedCode(%s, %s) = %s", (expected, scan, same) => {
    expect(sameScannedCode(expected, scan)).toBe(same);
  });

  test.each([
    // GS1 Digital Link URI syntax (docs/REFERENCES.md, § GS1).
    [{ gtin: "19527730001001", serial: "P-PW2-26-00001-K" }, "https://id.gs1.org/01/19527730001001/21/P-PW2-26-00001-K"],
    [{ gtin: "9527730009017", lot: "L 7/2" }, "https://id.gs1.org/01/09527730009017/10/L%207%2F2"],
    [{ sscc: "006141411234567890" }, "https://id.gs1.org/00/006141411234567890"],
    [{ gln: "0614141000012" }, "https://id.gs1.org/414/0614141000012"],
  ])("%o → %s", (key, uri) => {
    expect(digitalLink(key)).toBe(uri);
  });
});
