/**
 * How frequencies, bands, levels and Thiele–Small values are written on the lab's pages. Band
 * names are the ISO 266 nominal one-third-octave names listed in docs/REFERENCES.md, § One-third-octave bands;
 * "k" is the SI prefix kilo (10³, SI Brochure, BIPM, 9th ed.,
 * Table 7). The number of decimals shown is Twinleaf's own rule for its pages, stated in each case.
 */
import { describe, expect, test } from "vitest";
import { bandLabel, bandLabelOf, formatDb, formatHz, formatHzRange, formatLimitDb, formatTs, formatTsWithUnit, thirdOctaveBands, type TsField } from "@/lib/acoustics";

// ISO 266 nominal names, as listed in docs/REFERENCES.md, § One-third-octave bands, 20 Hz to 20 kHz.
const ISO_266 = ["20", "25", "31.5", "40", "50", "63", "80", "100", "125", "160", "200", "250", "315", "400", "500", "630", "800", "1k", "1.25k", "1.6k", "2k", "2.5k", "3.15k", "4k", "5k", "6.3k", "8k", "10k", "12.5k", "16k", "20k"];

describe("a band's name with its unit", () => {
  test.each<[string, string]>([
    ["3.15k", "3.15 kHz"], // the case from the lab: "3.15k Hz" becomes "3.15 kHz"
    ["1.6k", "1.6 kHz"],
    ["1k", "1 kHz"],
    ["31.5", "31.5 Hz"],
    ["100", "100 Hz"],
    ["20k", "20 kHz"],
    ["1M", "1 MHz"],
  ])("%s → %s", (nominal, label) => {
    expect(bandLabel(nominal)).toBe(label);
  });

  test("every ISO 266 band from 20 Hz to 20 kHz reads as its name and a unit, with no letter left on the number", () => {
    const labels = thirdOctaveBands(20, 20000).map((b) => bandLabel(b.nominal));
    expect(labels).toEqual(ISO_266.map((n) => (n.endsWith("k") ? `${n.slice(0, -1)} kHz` : `${n} Hz`)));
  });

  test.each<[number, string]>([
    [0, "1 kHz"], // band 0 is 1 kHz (IEC 61260-1 reference frequency)
    [2, "1.6 kHz"],
    [-10, "100 Hz"],
    [-15, "31.5 Hz"],
  ])("band index %i is %s", (x, label) => {
    expect(bandLabelOf(x)).toBe(label);
  });
});

describe("a frequency with its unit, three significant figures (Twinleaf's rule)", () => {
  test.each<[number, string]>([
    [20, "20 Hz"],
    [31.5, "31.5 Hz"],
    [19.9526, "20 Hz"], // the exact centre of the 20 Hz band (IEC 61260-1, docs/REFERENCES.md, § One-third-octave bands)
    [1000, "1 kHz"],
    [1258.925, "1.26 kHz"], // the exact centre of the 1.25 kHz band (IEC 61260-1, docs/REFERENCES.md, § One-third-octave bands)
    [999.7, "1 kHz"], // rounds up into kilohertz
    [2000, "2 kHz"],
    [12500, "12.5 kHz"],
    [20000, "20 kHz"],
  ])("%d Hz → %s", (hz, text) => {
    expect(formatHz(hz)).toBe(text);
  });

  test.each<[number, number, string]>([
    [1600, 20000, "1.6–20 kHz"],
    [200, 5000, "200 Hz–5 kHz"],
    [31.5, 1000, "31.5 Hz–1 kHz"],
    [100, 500, "100–500 Hz"],
  ])("%d to %d Hz → %s", (lo, hi, text) => {
    expect(formatHzRange(lo, hi)).toBe(text);
  });
});

describe("levels in dB, always with the unit (Twinleaf's rule: two decimals; a limit as set, at least one)", () => {
  test.each<[number, string]>([
    [0.2449, "0.24 dB"],
    [1.4321, "1.43 dB"],
    [0, "0.00 dB"],
  ])("difference %d → %s", (db, text) => {
    expect(formatDb(db)).toBe(text);
  });

  test.each<[number, string]>([
    [1, "1.0 dB"],
    [0.5, "0.5 dB"],
    [0.25, "0.25 dB"],
    [1.5, "1.5 dB"],
  ])("limit %d → %s", (db, text) => {
    expect(formatLimitDb(db)).toBe(text);
  });
});

describe("Thiele–Small values with the precision they carry (Twinleaf's rule, from the brief)", () => {
  test.each<[TsField, number, string, string]>([
    ["fs", 37.51, "37.5", "37.5 Hz"], // docs/REFERENCES.md, § Loudspeaker parameters, worked example: Fs 37.51 Hz, shown to 0.1 Hz below 100 Hz
    ["fs", 905.4, "905", "905 Hz"], // whole hertz from 100 Hz
    ["fs", 99.96, "100.0", "100.0 Hz"],
    ["qts", 0.3783, "0.378", "0.378"], // docs/REFERENCES.md, § Loudspeaker parameters, worked example: Qts 0.3783
    ["qes", 0.4329, "0.433", "0.433"],
    ["qms", 2.996, "3.00", "3.00"], // two decimals from 1
    ["re", 6, "6.00", "6.00 Ω"],
    ["vas", 30.1, "30.1", "30.1 L"], // docs/REFERENCES.md, § Loudspeaker parameters, worked example: Vas 30.10 L
    ["vas", 0.05234, "0.0523", "0.0523 L"],
    ["sensitivity", 88.46, "88.5", "88.5 dB"],
  ])("%s %d → %s (%s)", (field, value, text, withUnit) => {
    expect(formatTs(field, value)).toBe(text);
    expect(formatTsWithUnit(field, value)).toBe(withUnit);
  });
});
