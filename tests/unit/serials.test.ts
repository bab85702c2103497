import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { toBuffer, toSVG } from "bwip-js/node";
import { gtin as cdigitGtin, mod37_2 as cdigitMod37_2 } from "cdigit";
import { beforeAll, describe, expect, test } from "vitest";
import { prepareZXingModule, readBarcodes } from "zxing-wasm/reader";
import {
  cartonElementString,
  formatSerial,
  gs1CheckDigit,
  GS,
  isValidGtin,
  isValidMod37_2,
  leafIdentity,
  MOD37_ALPHABET,
  mod37_2Check,
  nearMisses,
  normaliseScan,
  parseLeafIdentity,
  parseSerial,
  serialReadings,
  SERIAL_KIND_LETTERS,
  type SerialKind,
  type SerialParts,
} from "@/lib/serials";
import { seededRandom as rng } from "../fixtures/random";

const pick = (r: () => number, chars: string, n: number) => Array.from({ length: n }, () => chars[Math.floor(r() * chars.length)]!).join("");
const ALNUM = MOD37_ALPHABET.slice(0, 36);
const DIGITS = "0123456789";
const KINDS = Object.keys(SERIAL_KIND_LETTERS) as SerialKind[];

function randomParts(r: () => number, maxSeq = 99_999): SerialParts {
  const kind = KINDS[Math.floor(r() * KINDS.length)]!;
  const code = kind === "drive_unit" ? ["TW", "MR", "BS"][Math.floor(r() * 3)]! : pick(r, ALNUM, 2 + Math.floor(r() * 3));
  return { kind, code, year: 2000 + Math.floor(r() * 100), seq: 1 + Math.floor(r() * maxSeq) };
}
const compactOf = (serial: string) => serial.replace(/-/g, "");
/**
 * cdigit's verdict on body + check. cdigit skips characters outside its alphabet and so reads a
 * `*` inside the body as absent; the standard allows `*` only as the check, so that case is false.
 */
const oracleValid = (compact: string) => !compact.slice(0, -1).includes("*") && cdigitMod37_2.validate(compact);

// ───────────────────────────── ISO/IEC 7064 MOD 37-2 ─────────────────────────────

describe("mod37_2Check", () => {
  test.each([
    // ISO/IEC 7064 MOD 37-2 worked example (docs/REFERENCES.md, § ISO/IEC 7064 check characters)
    ["G123489654321", "Y"],
    // the same body with 8 and 9 transposed: the check changes, so the slip is caught (docs/REFERENCES.md, § ISO/IEC 7064 check characters)
    ["G123498654321", "H"],
  ])("%s → %s (published vector)", (body, check) => {
    expect(mod37_2Check(body)).toBe(check);
    expect(isValidMod37_2(body + check)).toBe(true);
  });

  test("the transposed published vector fails with the original's check character", () => {
    // ISO/IEC 7064 MOD 37-2 example pair (docs/REFERENCES.md, § ISO/IEC 7064 check characters): Y belongs to G123489654321 only.
    expect(isValidMod37_2("G123498654321Y")).toBe(false);
  });

  test("agrees with cdigit (the independent oracle) on 2000 random bodies", () => {
    const r = rng(7064);
    for (let i = 0; i < 2000; i++) {
      const body = pick(r, ALNUM, 1 + Math.floor(r() * 24));
      const check = mod37_2Check(body);
      expect(check, body).toBe(cdigitMod37_2.compute(body));
      // A random check character: valid exactly when the oracle says so (about 1 in 37).
      const guess = pick(r, MOD37_ALPHABET, 1);
      expect(isValidMod37_2(body + guess), body + guess).toBe(oracleValid(body + guess));
    }
  });

  test("can yield '*' (value 36), which the oracle also gives", () => {
    // cdigit: mod37_2.compute("PPW22600024") is "*"
    expect(mod37_2Check("PPW22600024")).toBe(cdigitMod37_2.compute("PPW22600024"));
    expect(mod37_2Check("PPW22600024")).toBe("*");
  });

  test.each([
    ["", /empty/],
    ["g123489654321", /"g" at position 1/],
    ["AB*C", /"\*" at position 3/],
    ["P-PW2", /"-" at position 2/],
    ["AB C", /" " at position 3/],
  ])("refuses body %j", (body, message) => {
    expect(() => mod37_2Check(body)).toThrow(message);
  });

  test.each([
    ["", "no characters"],
    ["Y", "a check character with no body"],
    ["g123489654321Y", "lower case (the alphabet is upper case)"],
    ["G1234*89654321Y", "a star inside the body"],
    ["G123489654321y", "a lower-case check"],
  ])("isValidMod37_2(%j) is false: %s", (text) => {
    expect(isValidMod37_2(text)).toBe(false);
  });
});

// ───────────────────────────── GS1 mod-10 ─────────────────────────────

describe("gs1CheckDigit", () => {
  test.each([
    ["629104150021", 3, "GS1 General Specifications, check digit worked example (6291041500213)"],
    ["730001100001", 7, "GS1 check digit example (docs/REFERENCES.md, § GS1)"],
    ["890400021003", 7, "GS1 check digit example (docs/REFERENCES.md, § GS1)"],
    ["0952123454321", 3, "GS1 example GTIN-14 09521234543213"],
    ["9501234567890", 3, "GS1 example GTIN-14 95012345678903"],
    ["0345312000001", 1, "GS1 example GTIN-14 03453120000011"],
    ["00614141123456789", 0, "GS1 example SSCC 006141411234567890"],
  ])("%s → %i (%s)", (data, digit) => {
    expect(gs1CheckDigit(data)).toBe(digit);
  });

  test("agrees with cdigit's gtin (the independent oracle) on 2000 random data strings of GTIN-8/12/13/14 and SSCC length", () => {
    const r = rng(10);
    const lengths = [7, 11, 12, 13, 17];
    for (let i = 0; i < 2000; i++) {
      const data = pick(r, DIGITS, lengths[i % lengths.length]!);
      expect(gs1CheckDigit(data), data).toBe(Number(cdigitGtin.compute(data)));
    }
  });

  test.each(["", "12a4", "12 34", "-123"])("refuses %j", (data) => {
    expect(() => gs1CheckDigit(data)).toThrow(/digits only/);
  });
});

describe("isValidGtin", () => {
  test.each([
    ["09521234543213", true, "GS1 example GTIN-14"],
    ["95012345678903", true, "GS1 example GTIN-14"],
    ["03453120000011", true, "GS1 example GTIN-14"],
    ["6291041500213", true, "GS1 worked example as GTIN-13"],
    ["7300011000017", true, "GS1 example 730001100001 → 7, as GTIN-13"],
    ["890400021003" + "7", true, "GS1 example 890400021003 → 7, as GTIN-13"],
    ["09521234543214", false, "GS1 example GTIN-14 with its check digit off by one"],
    ["6291041500212", false, "GS1 worked example with its check digit off by one"],
    ["006141411234567890", false, "a valid SSCC (18 digits) is not a GTIN length"],
    ["0952123454321", false, "13 digits whose last is not their check"],
    ["095212345432", false, "12 digits whose last is not their check"],
    ["0952123454321X", false, "not digits"],
  ])("%s → %s (%s)", (gtin, valid) => {
    expect(isValidGtin(gtin)).toBe(valid);
  });

  test("agrees with cdigit's gtin on random GTIN-8/12/13/14 (correct and wrong check digits)", () => {
    const r = rng(814);
    const lengths = [8, 12, 13, 14];
    for (let i = 0; i < 1000; i++) {
      const g = pick(r, DIGITS, lengths[i % 4]!);
      expect(isValidGtin(g), g).toBe(cdigitGtin.validate(g));
    }
  });

  // bwip-js lints the (01) element (docs/REFERENCES.md, § Independent libraries): for every possible check
  // digit of the published GTINs, it accepts exactly the one isValidGtin accepts.
  const bwipAccepts = (text: string) => {
    try {
      toSVG({ bcid: "gs1-128", text });
      return true;
    } catch {
      return false;
    }
  };
  test.each(["0952123454321", "9501234567890", "0345312000001"])("bwip-js's GS1 lint agrees on all ten check digits of %s", (data) => {
    const accepted = DIGITS.split("").filter((d) => bwipAccepts(`(01)${data}${d}`));
    expect(accepted).toEqual(DIGITS.split("").filter((d) => isValidGtin(data + d)));
    expect(accepted).toHaveLength(1);
  });
});

// ───────────────────────────── GS1 element strings ─────────────────────────────

describe("cartonElementString", () => {
  // A scanner's view of a printed label: render with bwip-js, decode with ZXing (zxing-wasm).
  // Both are independent of this code; "Plain" text keeps FNC1 as GS, "HRI" gives the brackets.
  beforeAll(async () => {
    const wasm = readFileSync(createRequire(import.meta.url).resolve("zxing-wasm/reader/zxing_reader.wasm"));
    await prepareZXingModule({
      overrides: { wasmBinary: wasm.buffer.slice(wasm.byteOffset, wasm.byteOffset + wasm.byteLength) as ArrayBuffer },
      fireImmediately: true,
    });
  });
  async function scan(bwipText: string) {
    const png = await toBuffer({ bcid: "gs1-128", text: bwipText, scale: 2, paddingwidth: 12, paddingheight: 4, backgroundcolor: "FFFFFF" });
    const [plain] = await readBarcodes(new Uint8Array(png), { formats: ["Code128"], textMode: "Plain" });
    const [hri] = await readBarcodes(new Uint8Array(png), { formats: ["Code128"], textMode: "HRI" });
    return { raw: plain?.text, hri: hri?.text, symbology: plain?.symbologyIdentifier };
  }

  test("the scan oracle reproduces GS1's published element string layout", async () => {
    // docs/REFERENCES.md, § GS1 (element string): (01)09521234543213(17)100101(10)123ABC(21)1234567890
    // encodes as FNC1 0952123454321317100101 10123ABC GS 211234567890.
    const scanned = await scan("(01)09521234543213(17)100101(10)123ABC(21)1234567890");
    expect(scanned.raw).toBe(`010952123454321317100101` + `10123ABC${GS}` + `211234567890`);
    expect(scanned.symbology).toBe("]C1"); // GS1-128: leading FNC1
  });

  const date = new Date("2026-03-05T12:00:00Z");
  // GS1 General Specifications: FNC1 (sent as GS) follows each variable-length element string
  // except the last; (01) and (11) are predefined-length and need none.
  test.each([
    [
      "serial only: the variable (21) is last, so no GS",
      { gtin: "09521234543213", serial: "K-PW2-26-00042-5", productionDate: date },
      "(01)09521234543213(11)260305(21)K-PW2-26-00042-5",
      `01095212345432131126030521K-PW2-26-00042-5`,
    ],
    [
      "serial and lot: GS after (21), none after the last (10)",
      { gtin: "95012345678903", serial: "K-PW2-26-00042-5", productionDate: date, lot: "L26-07" },
      "(01)95012345678903(11)260305(21)K-PW2-26-00042-5(10)L26-07",
      `01950123456789031126030521K-PW2-26-00042-5${GS}10L26-07`,
    ],
    [
      "a serial whose check is '*' (in CSET 82)",
      { gtin: "03453120000011", serial: "K-PW2-26-00024-*", productionDate: date, lot: "A" },
      "(01)03453120000011(11)260305(21)K-PW2-26-00024-*(10)A",
      `01034531200000111126030521K-PW2-26-00024-*${GS}10A`,
    ],
    [
      "20 characters: the longest (21) and (10) allowed",
      { gtin: "09521234543213", serial: "ABCDEFGHIJ0123456789", productionDate: date, lot: "abcdefghij!%&'*+,./:" },
      "(01)09521234543213(11)260305(21)ABCDEFGHIJ0123456789(10)abcdefghij!%&'*+,./:",
      `01095212345432131126030521ABCDEFGHIJ0123456789${GS}10abcdefghij!%&'*+,./:`,
    ],
  ])("%s", async (_label, input, hri, raw) => {
    const out = cartonElementString(input);
    expect(out).toEqual({ hri, bwipText: hri, raw });
    // What bwip-js encodes from our text, ZXing reads back as our raw data and HRI.
    const scanned = await scan(out.bwipText);
    expect(scanned.raw).toBe(out.raw);
    expect(scanned.hri).toBe(out.hri);
  });

  test.each([
    // Calendar dates per the IANA time zone database: 23:30 UTC on 5 March is 6 March 12:30 in
    // Auckland (NZDT, UTC+13) and still 5 March 18:30 in New York (EST, UTC−5).
    ["UTC", "260305"],
    ["Pacific/Auckland", "260306"],
    ["America/New_York", "260305"],
  ])("(11) is the production date's calendar day in %s", (timeZone, yymmdd) => {
    const out = cartonElementString({ gtin: "09521234543213", serial: "A1", productionDate: new Date("2026-03-05T23:30:00Z"), timeZone });
    expect(out.hri).toContain(`(11)${yymmdd}`);
  });

  const ok = { gtin: "09521234543213", serial: "K-PW2-26-00042-5", productionDate: date };
  test.each([
    ["a 13-digit GTIN", { ...ok, gtin: "6291041500213" }, /14 digits/],
    ["a GTIN-14 with a wrong check digit", { ...ok, gtin: "09521234543214" }, /check digit 4.*need 3/],
    ["an empty serial", { ...ok, serial: "" }, /\(21\) serial: must be 1 to 20/],
    ["a 21-character serial", { ...ok, serial: "A".repeat(21) }, /\(21\) serial: must be 1 to 20 characters, got 21/],
    ["a serial with a space", { ...ok, serial: "K PW2" }, /\(21\) serial.*outside GS1 CSET 82: " "/],
    ["a serial with #", { ...ok, serial: "K#1" }, /outside GS1 CSET 82: "#"/],
    ["a lot with @", { ...ok, lot: "L@1" }, /\(10\) lot.*"@"/],
    ["a 21-character lot", { ...ok, lot: "1".repeat(21) }, /\(10\) lot: must be 1 to 20/],
    ["a lot with a parenthesis", { ...ok, lot: "L(1)" }, /parenthesis/],
    ["an invalid date", { ...ok, productionDate: new Date("not a date") }, /not a valid date/],
  ])("refuses %s", (_label, input, message) => {
    expect(() => cartonElementString(input)).toThrow(message);
  });

  test("accepts in (21) exactly the printable ASCII characters bwip-js's CSET 82 lint accepts", () => {
    // bwip-js (BWIPP) lints CSET 82 independently; parentheses are left out because its bracketed
    // input reads them as AI delimiters, which is why they are refused here.
    for (let code = 0x20; code <= 0x7e; code++) {
      const ch = String.fromCharCode(code);
      if (ch === "(" || ch === ")") continue;
      let bwip = true;
      try {
        toSVG({ bcid: "gs1-128", text: `(01)09521234543213(21)A${ch}B` });
      } catch {
        bwip = false;
      }
      let ours = true;
      try {
        cartonElementString({ ...ok, serial: `A${ch}B` });
      } catch {
        ours = false;
      }
      expect(ours, JSON.stringify(ch)).toBe(bwip);
    }
  });
});

// ───────────────────────────── serial format ─────────────────────────────

describe("formatSerial", () => {
  // Each check character also confirmed with cdigit's mod37_2 over the hyphen-less body.
  test.each<[SerialParts, string]>([
    [{ kind: "pair", code: "PW2", year: 2026, seq: 42 }, "P-PW2-26-00042-W"],
    [{ kind: "speaker", code: "PW2", year: 2026, seq: 42 }, "S-PW2-26-00042-U"],
    [{ kind: "cabinet", code: "PW2", year: 2026, seq: 1 }, "C-PW2-26-00001-Y"],
    [{ kind: "drive_unit", code: "TW", year: 2026, seq: 1 }, "D-TW-26-00001-7"],
    [{ kind: "drive_unit", code: "BS", year: 2026, seq: 300 }, "D-BS-26-00300-D"],
    [{ kind: "drive_unit", code: "MR", year: 2026, seq: 12345 }, "D-MR-26-12345-N"],
    [{ kind: "flitch", code: "WAL", year: 2026, seq: 12 }, "F-WAL-26-00012-Z"],
    [{ kind: "shipment", code: "DL01", year: 2026, seq: 7 }, "H-DL01-26-00007-R"],
    [{ kind: "carton", code: "PW2", year: 2026, seq: 123456 }, "K-PW2-26-123456-U"],
    [{ kind: "cabinet", code: "AB", year: 2000, seq: 1 }, "C-AB-00-00001-E"],
    [{ kind: "crossover", code: "ZZ99", year: 2099, seq: 99999 }, "X-ZZ99-99-99999-B"],
    [{ kind: "pair", code: "PW2", year: 2026, seq: 24 }, "P-PW2-26-00024-*"],
  ])("%o → %s", (parts, expected) => {
    expect(formatSerial(parts)).toBe(expected);
    expect(cdigitMod37_2.validate(compactOf(expected))).toBe(true);
  });

  test.each<[string, SerialParts, RegExp]>([
    ["an unserialised kind", { kind: "leaf" as SerialKind, code: "PW2", year: 2026, seq: 1 }, /not a serialised kind/],
    ["a 1-character code", { kind: "pair", code: "P", year: 2026, seq: 1 }, /2 to 4/],
    ["a 5-character code", { kind: "pair", code: "PW2XL", year: 2026, seq: 1 }, /2 to 4/],
    ["a lower-case code", { kind: "pair", code: "pw2", year: 2026, seq: 1 }, /2 to 4 of A-Z 0-9/],
    ["a drive unit with a model code", { kind: "drive_unit", code: "PW2", year: 2026, seq: 1 }, /part type/],
    ["a two-digit year", { kind: "pair", code: "PW2", year: 26, seq: 1 }, /2000–2099/],
    ["year 2100", { kind: "pair", code: "PW2", year: 2100, seq: 1 }, /2000–2099/],
    ["sequence 0", { kind: "pair", code: "PW2", year: 2026, seq: 0 }, /1–999999999/],
    ["a fractional sequence", { kind: "pair", code: "PW2", year: 2026, seq: 1.5 }, /sequence number/],
    ["a 10-digit sequence", { kind: "pair", code: "PW2", year: 2026, seq: 1_000_000_000 }, /sequence number/],
  ])("refuses %s", (_label, parts, message) => {
    expect(() => formatSerial(parts)).toThrow(message);
  });
});

describe("parseSerial", () => {
  test("round-trips 1000 random serials, hyphenated and separator-less, in upper and lower case", () => {
    const r = rng(37);
    for (let i = 0; i < 1000; i++) {
      const parts = randomParts(r);
      const serial = formatSerial(parts);
      const expected = { ...parts, check: serial.slice(-1), canonical: serial, valid: true };
      for (const typed of [serial, serial.toLowerCase(), compactOf(serial), compactOf(serial).toLowerCase(), serial.replace(/-/g, " ")]) {
        expect(parseSerial(typed), typed).toEqual(expected);
      }
    }
  });

  const pair42 = { kind: "pair", code: "PW2", year: 2026, seq: 42, check: "W", canonical: "P-PW2-26-00042-W", valid: true };
  // Forgiving input per the serial design: case, spaces for hyphens, no separators, scanner framing.
  test.each([
    ["canonical", "P-PW2-26-00042-W"],
    ["lower case", "p-pw2-26-00042-w"],
    ["spaces for hyphens", "P PW2 26 00042 W"],
    ["no separators (scanner)", "PPW22600042W"],
    ["no separators, lower case (keyboard)", "ppw22600042w"],
    ["surrounding space", "  P-PW2-26-00042-W  "],
    ["scanner suffix CR LF", "P-PW2-26-00042-W\r\n"],
    ["scanner framing STX … ETX", "\u0002P-PW2-26-00042-W\u0003"],
    ["a GS the scanner passed on", "P-PW2-26-00042-W\u001d"],
    ["tabs as separators (stripped)", "P\tPW2\t26\t00042\tW"],
    ["doubled and mixed separators", "P -PW2  26--00042 W"],
    ["the sequence's zeros left off when fields are separated", "P-PW2-26-42-W"],
    ["extra zeros on the sequence when fields are separated", "P PW2 26 000042 W"],
    ["one separator missing", "P-PW226-00042-W"],
    ["only the check set apart", "PPW22600042 W"],
  ])("reads %s: %j", (_label, text) => {
    expect(parseSerial(text)).toEqual(pair42);
  });

  test.each([
    ["a wrong check character", "P-PW2-26-00042-X", { ...pair42, check: "X", canonical: "P-PW2-26-00042-X", valid: false }],
    ["a '*' check that fits", "p pw2 26 00024 *", { ...pair42, seq: 24, check: "*", canonical: "P-PW2-26-00024-*", valid: true }],
    [
      "a drive unit, compact",
      "dtw2600001 7",
      { kind: "drive_unit", code: "TW", year: 2026, seq: 1, check: "7", canonical: "D-TW-26-00001-7", valid: true },
    ],
    [
      "a six-digit sequence",
      "K-PW2-26-123456-U",
      { kind: "carton", code: "PW2", year: 2026, seq: 123456, check: "U", canonical: "K-PW2-26-123456-U", valid: true },
    ],
  ])("reads %s", (_label, text, expected) => {
    expect(parseSerial(text)).toEqual(expected);
  });

  test.each([
    ["empty", ""],
    ["a word", "hello"],
    ["an unknown kind letter", "Q-PW2-26-00042-W"],
    ["a leaf's kind has no letter", "L-PW2-26-00042-W"],
    ["a 1-character code", "P-P-26-00042-W"],
    ["a 5-character code", "P-PWXYZ-26-00042-W"],
    ["a drive unit whose code is no part type", "D-XX-26-00001-7"],
    ["a letter in the sequence", "P-PW2-26-0O042-W"],
    ["no check character", "P-PW2-26-00042"],
    ["sequence 0", "P-PW2-26-00000-W"],
    ["a 10-digit sequence", "P-PW2-26-1234567890-W"],
    ["a hyphen-less string too short", "PPW260004W"],
    ["a separator inside a field", "P-PW2-26-0004-2W"],
    ["fields of the wrong length, no reading fits the separators", "P-PW2-2026-00042-W"],
    ["a star in the body", "P-PW*-26-00042-W"],
    ["a leaf identity", "F-WAL-26-00012-Z/03"],
  ])("is null for %s: %j", (_label, text) => {
    expect(parseSerial(text)).toBeNull();
  });
});

describe("serialReadings", () => {
  // The check covers the body without hyphens, so every reading of one compact string has the same
  // validity; the 5-digit sequence decides (then the caller may look the others up).
  test.each([
    ["PPW22600042W", ["P-PW2-26-00042-W", "P-PW-22-600042-W"]],
    ["P-PW2-26-00042-W", ["P-PW2-26-00042-W"]],
    // A six-digit serial typed without separators is read first as a 4-character code.
    ["KPW226123456U", ["K-PW22-61-23456-U", "K-PW2-26-123456-U", "K-PW-22-6123456-U"]],
    // A separator the person typed rules out the readings that would cut a field.
    ["K-PW2 26123456U", ["K-PW2-26-123456-U"]],
    ["DTW26000017", ["D-TW-26-00001-7"]],
  ])("%s → %j", (text, canonicals) => {
    const readings = serialReadings(text);
    expect(readings.map((r) => r.canonical)).toEqual(canonicals);
    expect(readings.every((r) => r.valid === cdigitMod37_2.validate(compactOf(r.canonical)))).toBe(true);
  });
});

describe("normaliseScan", () => {
  test.each([
    ["  p-pw2-26-00042-w\r\n", "P-PW2-26-00042-W"],
    ["\u0002F-WAL-26-00012-Z/03\u0003", "F-WAL-26-00012-Z/03"],
    ["\u001bK-PW2\u007f-26\u009b", "K-PW2-26"],
    ["a b", "A B"],
  ])("%j → %j", (text, expected) => {
    expect(normaliseScan(text)).toBe(expected);
  });
});

describe("leaf identities", () => {
  test.each([
    ["F-WAL-26-00012-Z", 3, "F-WAL-26-00012-Z/03"],
    ["fwal2600012z", 12, "F-WAL-26-00012-Z/12"],
    ["F-WAL-26-00012-Z", 99, "F-WAL-26-00012-Z/99"],
  ])("leafIdentity(%j, %i) → %s", (flitch, leafNo, expected) => {
    expect(leafIdentity(flitch, leafNo)).toBe(expected);
  });

  test.each([
    ["P-PW2-26-00042-W", 1, /not a flitch serial/],
    ["F-WAL-26-00012-Y", 1, /does not fit/],
    ["F-WAL-26-00012-Z", 0, /1–99/],
    ["F-WAL-26-00012-Z", 100, /1–99/],
    ["F-WAL-26-00012-Z", 2.5, /1–99/],
  ])("leafIdentity(%j, %i) throws", (flitch, leafNo, message) => {
    expect(() => leafIdentity(flitch, leafNo)).toThrow(message);
  });

  const leaf3 = { leafNo: 3, canonical: "F-WAL-26-00012-Z/03", valid: true };
  test.each([
    ["F-WAL-26-00012-Z/03"],
    ["f wal 26 00012 z/3"],
    ["FWAL2600012Z/03"],
    ["F-WAL-26-00012-Z / 03\r\n"],
  ])("parseLeafIdentity(%j) reads leaf 3 of F-WAL-26-00012-Z", (text) => {
    expect(parseLeafIdentity(text)).toMatchObject({ ...leaf3, flitch: { kind: "flitch", code: "WAL", seq: 12, valid: true } });
  });

  test("parseLeafIdentity reports a flitch check that does not fit", () => {
    expect(parseLeafIdentity("F-WAL-26-00012-Y/03")).toMatchObject({ canonical: "F-WAL-26-00012-Y/03", valid: false });
  });

  test.each([
    ["no leaf number", "F-WAL-26-00012-Z"],
    ["two slashes", "F-WAL-26-00012-Z/03/04"],
    ["a three-digit leaf", "F-WAL-26-00012-Z/003"],
    ["leaf 0", "F-WAL-26-00012-Z/00"],
    ["not a flitch", "P-PW2-26-00042-W/03"],
    ["no number after the slash", "F-WAL-26-00012-Z/"],
  ])("parseLeafIdentity is null for %s", (_label, text) => {
    expect(parseLeafIdentity(text)).toBeNull();
  });
});

// ───────────────────────────── near misses ─────────────────────────────

/** Every slip of `serial` in its own layout: each substitution by any of the 37 characters, each adjacent swap. */
function slips(serial: string): string[] {
  const compact = compactOf(serial);
  const lengths = serial.split("-").map((p) => p.length);
  const layout = (c: string) => {
    const out: string[] = [];
    let at = 0;
    for (const n of lengths) out.push(c.slice(at, (at += n)));
    return out.join("-");
  };
  const found: string[] = [];
  for (let k = 0; k < compact.length; k++) {
    for (const ch of MOD37_ALPHABET) {
      if (ch !== compact[k]) found.push(layout(compact.slice(0, k) + ch + compact.slice(k + 1)));
    }
  }
  for (let k = 0; k + 1 < compact.length; k++) {
    if (compact[k] !== compact[k + 1]) found.push(layout(compact.slice(0, k) + compact[k + 1] + compact[k] + compact.slice(k + 2)));
  }
  return found;
}

describe("nearMisses", () => {
  test.each([
    ["P-PW2-26-00024-W", "P-PW2-26-00042-W", "adjacent digits swapped"],
    ["P-PW2-26-00042-X", "P-PW2-26-00042-W", "wrong check character"],
    ["P-PW2-26-0O042-W", "P-PW2-26-00042-W", "letter O for zero"],
    ["ppw22600O42w", "P-PW2-26-00042-W", "compact, lower case, O for zero"],
    ["P-PW2-26-00042-*", "P-PW2-26-00042-W", "check typed as star"],
    ["P-PW2-26-00024-Y", "P-PW2-26-00024-*", "a star check mistyped"],
    ["D-TW-26-00001-Y", "D-TW-26-00001-7", "drive unit"],
    ["C-PW2-26-0000Y-1", "C-PW2-26-00001-Y", "last digit swapped with the check across a hyphen"],
  ])("%s includes %s (%s)", (typed, original) => {
    expect(nearMisses(typed)).toContain(original);
  });

  test.each([
    ["P-PW2-26-00042-W", "a valid serial: no slip leads from one valid serial to another"],
    ["hello", "not shaped like a serial"],
    ["", "empty"],
  ])("%j → [] (%s)", (text) => {
    expect(nearMisses(text)).toEqual([]);
  });

  test("for 60 random serials, every slip whose check fails leads back to the original, and every candidate is a valid serial", () => {
    // The property MOD 37-2 guarantees (ISO/IEC 7064: all single substitutions and adjacent
    // transpositions detected); validity judged by cdigit, the independent oracle.
    const r = rng(2);
    // Failures are collected rather than asserted one by one: ~29 000 slips make expect() the cost.
    const failures: string[] = [];
    let slipsTried = 0;
    for (let i = 0; i < 60; i++) {
      const original = formatSerial(randomParts(r, i % 10 === 0 ? 999_999 : 99_999));
      for (const slip of slips(original)) {
        slipsTried++;
        if (oracleValid(compactOf(slip))) failures.push(`${slip}: a slip of ${original} that the check does not catch`);
        const candidates = nearMisses(slip);
        if (!candidates.includes(original)) failures.push(`${slip}: ${original} missing from ${candidates.join(" ")}`);
        for (const c of candidates) {
          if (!parseSerial(c)?.valid || !oracleValid(compactOf(c))) failures.push(`${slip}: candidate ${c} is not a valid serial`);
        }
        if (new Set(candidates).size !== candidates.length) failures.push(`${slip}: duplicates in ${candidates.join(" ")}`);
      }
    }
    expect(slipsTried).toBeGreaterThan(60 * 400);
    expect(failures).toEqual([]);
  });

  test("returns exactly the valid, serial-shaped strings one slip away (brute force with cdigit as judge)", () => {
    const r = rng(3);
    for (let i = 0; i < 200; i++) {
      const original = formatSerial(randomParts(r));
      const all = slips(original);
      const typed = all[Math.floor(r() * all.length)]!;
      const expected = new Set(
        slips(typed).filter((s) => oracleValid(compactOf(s)) && parseSerial(s)?.canonical === s),
      );
      expect(new Set(nearMisses(typed)), typed).toEqual(expected);
    }
  });

  test("takes well under 1 ms for one serial", () => {
    const typed = "P-PW2-26-00024-W";
    nearMisses(typed);
    const start = performance.now();
    for (let i = 0; i < 1000; i++) nearMisses(typed);
    expect((performance.now() - start) / 1000).toBeLessThan(1);
  });
});
