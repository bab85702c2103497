import { readFileSync } from "node:fs";
import { describe, expect, test } from "vitest";
import {
  boardVerdict,
  checkNominal,
  crossoverValues,
  E_SERIES,
  formatValue,
  nearestPreferred,
  ON_SERIES_TOLERANCE,
  parseNominal,
  parseReading,
  parseValue,
  readPartValues,
  READING_SLIP_FACTOR,
  TOLERANCE_LETTERS,
  toleranceOf,
  withinTolerance,
  type BoardPart,
  type Unit,
} from "@/lib/crossover-parts";

// Every expected value below names its source.

// IEC 60063 E12, as listed in docs/REFERENCES.md, § Crossover networks.
const IEC_60063_E12 = [1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2];
// IEC 60063 E24 = E12 plus these, as listed in docs/REFERENCES.md, § Crossover networks ("E24 adds …").
const IEC_60063_E24_ADDS = [1.1, 1.3, 1.6, 2.0, 2.4, 3.0, 3.6, 4.3, 5.1, 6.2, 7.5, 9.1];
const IEC_60063_E24 = [...IEC_60063_E12, ...IEC_60063_E24_ADDS].sort((a, b) => a - b);
// IEC 60063:2015 Table 1, E6 column (docs/REFERENCES.md, § Crossover networks; as reproduced at
// https://www.qsl.net/g4usp/Components/Component%20preferred%20values.htm).
const IEC_60063_E6 = [1.0, 1.5, 2.2, 3.3, 4.7, 6.8];

describe("IEC 60063 preferred-value tables", () => {
  test("E24 built from docs/REFERENCES.md, § Crossover networks has 24 distinct values", () => {
    expect(new Set(IEC_60063_E24).size).toBe(24);
  });

  test.each(IEC_60063_E12.map((v, i) => [i, v]))("E12[%i] is %d (IEC 60063 via docs/REFERENCES.md, § Crossover networks)", (i, v) => {
    expect(E_SERIES.E12[i]).toBe(v);
  });

  test.each(IEC_60063_E24.map((v, i) => [i, v]))("E24[%i] is %d (IEC 60063 via docs/REFERENCES.md, § Crossover networks)", (i, v) => {
    expect(E_SERIES.E24[i]).toBe(v);
  });

  test.each(IEC_60063_E6.map((v, i) => [i, v]))("E6[%i] is %d (IEC 60063:2015 Table 1)", (i, v) => {
    expect(E_SERIES.E6[i]).toBe(v);
  });

  test("lengths, and each series is every second value of the next (how IEC 60063 nests them)", () => {
    expect(E_SERIES.E6).toHaveLength(6);
    expect(E_SERIES.E12).toHaveLength(12);
    expect(E_SERIES.E24).toHaveLength(24);
    expect(E_SERIES.E24.filter((_, i) => i % 2 === 0)).toEqual(E_SERIES.E12);
    expect(E_SERIES.E12.filter((_, i) => i % 2 === 0)).toEqual(E_SERIES.E6);
  });

  test("the tables cannot be changed at run time", () => {
    expect(Object.isFrozen(E_SERIES)).toBe(true);
    expect(Object.isFrozen(E_SERIES.E24)).toBe(true);
  });
});

describe("naive rounding of 10^(k/n) is not IEC 60063 (docs/REFERENCES.md, § Crossover networks: wrong in 8 places)", () => {
  const naive = (n: number) => Array.from({ length: n }, (_, k) => Number((10 ** (k / n)).toPrecision(2)));
  const differences = (n: number, table: readonly number[]) =>
    naive(n).flatMap((v, k) => (v === table[k] ? [] : [{ k, naive: v, standard: table[k] }]));

  test("E24 differs from naive rounding in exactly 8 places, derived here", () => {
    const diff = differences(24, E_SERIES.E24);
    expect(diff).toHaveLength(8); // docs/REFERENCES.md, § Crossover networks: "rounding 10^(k/24) gives a wrong value in 8 places"
    // What the derivation finds (10^(10/24) = 2.610… rounds to 2.6, the standard says 2.7, and so on):
    expect(diff.map((d) => d.standard)).toEqual([2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 8.2]);
    expect(diff.map((d) => d.naive)).toEqual([2.6, 2.9, 3.2, 3.5, 3.8, 4.2, 4.6, 8.3]);
    expect(diff.map((d) => d.k)).toEqual([10, 11, 12, 13, 14, 15, 16, 22]);
  });

  test("everywhere else the hard-coded E24 equals naive rounding", () => {
    const n = naive(24);
    const differ = new Set(differences(24, E_SERIES.E24).map((d) => d.k));
    for (let k = 0; k < 24; k++) if (!differ.has(k)) expect(E_SERIES.E24[k]).toBe(n[k]);
  });

  test("E12 and E6 inherit the differences that fall on their members", () => {
    expect(differences(12, E_SERIES.E12).map((d) => d.standard)).toEqual([2.7, 3.3, 3.9, 4.7, 8.2]);
    expect(differences(6, E_SERIES.E6).map((d) => d.standard)).toEqual([3.3, 4.7]);
  });
});

describe("nearestPreferred", () => {
  test("4.8 µF: nearest E24 is 4.7 µF, +2.13 %, off the series", () => {
    const r = nearestPreferred(4.8e-6, "E24");
    expect(r.mantissa).toBe(4.7);
    expect(r.preferred).toBe(4.7e-6);
    expect(r.onSeries).toBe(false);
    expect(r.deviationPct).toBeCloseTo((4.8 / 4.7 - 1) * 100, 10);
  });

  test("the preferred value is exact in every decade", () => {
    expect(nearestPreferred(8.2, "E24").preferred).toBe(8.2);
    expect(nearestPreferred(0.00082, "E12").preferred).toBe(0.00082);
    expect(nearestPreferred(4.7e-6, "E6")).toEqual({ preferred: 4.7e-6, mantissa: 4.7, onSeries: true, deviationPct: 0 });
    expect(nearestPreferred(1500, "E24").preferred).toBe(1500);
  });

  test("across a decade: 9.6 is nearer 10 than 9.1 (by ratio)", () => {
    const r = nearestPreferred(9.6, "E24");
    expect(r.mantissa).toBe(1);
    expect(r.preferred).toBe(10);
    expect(nearestPreferred(0.96e-6, "E24").preferred).toBe(1e-6);
  });

  test("on-series tolerance is ±0.5 %, limit included", () => {
    expect(ON_SERIES_TOLERANCE).toBe(0.005);
    expect(nearestPreferred(4.7e-6 * 1.005, "E24").onSeries).toBe(true);
    expect(nearestPreferred(4.7e-6 * 0.995, "E24").onSeries).toBe(true);
    expect(nearestPreferred(4.72e-6, "E24").onSeries).toBe(true);
    expect(nearestPreferred(4.7e-6 * 1.0051, "E24").onSeries).toBe(false);
    expect(nearestPreferred(4.7e-6 * 0.9949, "E24").onSeries).toBe(false);
  });

  test("refuses a value that is not greater than zero, or an unknown series", () => {
    expect(() => nearestPreferred(0, "E24")).toThrow(/greater than zero/);
    expect(() => nearestPreferred(-1, "E24")).toThrow(/greater than zero/);
    expect(() => nearestPreferred(Number.NaN, "E24")).toThrow(/greater than zero/);
    expect(() => nearestPreferred(1, "E96" as "E24")).toThrow(/"E96" is not a series.*E6, E12, E24/);
  });
});

describe("checkNominal names the neighbours below and above", () => {
  test.each<[number, Unit, "E6" | "E12" | "E24" | undefined, string]>([
    [4.8e-6, "F", undefined, "4.8 µF is not an E24 value; the nearest are 4.7 µF and 5.1 µF."],
    [9.5e-8, "F", "E24", "95 nF is not an E24 value; the nearest are 91 nF and 100 nF."],
    [8.25, "Ω", "E24", "8.25 Ω is not an E24 value; the nearest are 8.2 Ω and 9.1 Ω."],
    [5.1e-6, "F", "E12", "5.1 µF is not an E12 value; the nearest are 4.7 µF and 5.6 µF."],
    [3.9e-3, "H", "E6", "3.9 mH is not an E6 value; the nearest are 3.3 mH and 4.7 mH."],
    [1.05e-3, "H", "E24", "1.05 mH is not an E24 value; the nearest are 1 mH and 1.1 mH."],
  ])("%d %s on %s", (value, unit, series, message) => {
    expect(checkNominal(value, unit, series)).toEqual({ ok: false, message });
  });

  test.each<[number, Unit, "E6" | "E12" | "E24"]>([
    [4.7e-6, "F", "E24"],
    [5.1e-6, "F", "E24"],
    [0.00082, "H", "E12"],
    [8.2, "Ω", "E12"],
    [6.8e-6, "F", "E6"],
    [1e-6, "F", "E6"],
    [4.72e-6, "F", "E24"], // within ±0.5 %
  ])("%d %s is on %s", (value, unit, series) => {
    expect(checkNominal(value, unit, series)).toEqual({ ok: true });
  });

  test("refuses unusable input with a message", () => {
    expect(checkNominal(0, "F")).toEqual({ ok: false, message: "A nominal value must be greater than zero (got 0)." });
    expect(checkNominal(1, "V" as Unit)).toMatchObject({ ok: false, message: expect.stringMatching(/F, H or Ω/) });
    expect(checkNominal(1, "F", "E3" as "E6")).toMatchObject({ ok: false, message: expect.stringMatching(/E6, E12, E24/) });
  });
});

describe("IEC 60062 tolerance letters", () => {
  // IEC 60062 via docs/REFERENCES.md, § Crossover networks: B ±0.1 %, C ±0.25 %, D ±0.5 %, F ±1 %, G ±2 %, J ±5 %, K ±10 %, M ±20 %.
  const IEC_60062 = { B: 0.001, C: 0.0025, D: 0.005, F: 0.01, G: 0.02, J: 0.05, K: 0.1, M: 0.2 };

  test("the table is exactly the IEC 60062 letters", () => {
    expect(TOLERANCE_LETTERS).toEqual(IEC_60062);
    expect(Object.isFrozen(TOLERANCE_LETTERS)).toBe(true);
  });

  test.each(Object.entries(IEC_60062))("toleranceOf(%s) is %d", (letter, fraction) => {
    expect(toleranceOf(letter)).toBe(fraction);
    expect(toleranceOf(` ${letter.toLowerCase()} `)).toBe(fraction);
  });

  test.each(["A", "E", "H", "Z", "", "JJ", "5%", "toString", "__proto__"])("refuses %j and lists the known letters", (letter) => {
    expect(() => toleranceOf(letter)).toThrow(RangeError);
    expect(() => toleranceOf(letter)).toThrow(
      `"${letter}" is not an IEC 60062 tolerance letter; use one of B (±0.1 %), C (±0.25 %), D (±0.5 %), F (±1 %), G (±2 %), J (±5 %), K (±10 %), M (±20 %).`,
    );
  });
});

describe("withinTolerance: the limit itself passes (epsilon 1e-9 relative)", () => {
  test("4.7 µF J: exactly +5 % and −5 % pass, +5.01 % and −5.01 % fail", () => {
    const at = withinTolerance(4.935e-6, 4.7e-6, "J"); // 4.7 · 1.05
    expect(at.ok).toBe(true);
    expect(at.deviationPct).toBeCloseTo(5, 10);
    expect(at.limitPct).toBe(5);
    expect(withinTolerance(4.465e-6, 4.7e-6, "J").ok).toBe(true); // 4.7 · 0.95
    const over = withinTolerance(4.7e-6 * 1.0501, 4.7e-6, "J");
    expect(over.ok).toBe(false);
    expect(over.deviationPct).toBeCloseTo(5.01, 10);
    expect(withinTolerance(4.7e-6 * 0.9499, 4.7e-6, "J").ok).toBe(false);
  });

  test("8 Ω at the J limit, 0.82 mH at the K limit, 8.2 Ω at the B limit", () => {
    expect(withinTolerance(8.4, 8, "J").ok).toBe(true);
    expect(withinTolerance(8.4008, 8, "J").ok).toBe(false);
    expect(withinTolerance(0.902e-3, 0.82e-3, "K").ok).toBe(true);
    expect(withinTolerance(0.738e-3, 0.82e-3, "K").ok).toBe(true);
    expect(withinTolerance(8.2082, 8.2, "B").ok).toBe(true);
    expect(withinTolerance(8.2083, 8.2, "B").ok).toBe(false);
  });

  test("limitPct and deviationPct", () => {
    expect(withinTolerance(4.7e-6, 4.7e-6, "C")).toEqual({ ok: true, deviationPct: 0, limitPct: 0.25 });
    expect(withinTolerance(4.32e-6, 4.7e-6, "J").deviationPct).toBeCloseTo(-8.0851, 3);
  });

  test("refuses an unknown letter, a bad nominal or a bad reading", () => {
    expect(() => withinTolerance(1, 1, "Q")).toThrow(/"Q" is not an IEC 60062 tolerance letter/);
    expect(() => withinTolerance(1, 0, "J")).toThrow(/nominal value must be a number greater than zero/);
    expect(() => withinTolerance(-1, 1, "J")).toThrow(/reading must be a number of zero or more/);
    expect(() => withinTolerance(Number.NaN, 1, "J")).toThrow(/reading must be a number/);
  });
});

describe("parseValue reads every notation the lab writes", () => {
  test.each<[string, Unit | undefined, number, Unit, string]>([
    ["4.7µF", undefined, 4.7e-6, "F", "4.7 µF"],
    ["4.7uF", undefined, 4.7e-6, "F", "4.7 µF"],
    ["4.7μF", undefined, 4.7e-6, "F", "4.7 µF"], // Greek mu U+03BC as well as the micro sign U+00B5
    ["4.7uf", undefined, 4.7e-6, "F", "4.7 µF"],
    ["4u7", "F", 4.7e-6, "F", "4.7 µF"], // IEC 60062 RKM: the letter is the decimal point
    ["4u7F", undefined, 4.7e-6, "F", "4.7 µF"],
    ["4,7 µF", undefined, 4.7e-6, "F", "4.7 µF"],
    ["0,470 µF", undefined, 4.7e-7, "F", "0.47 µF"],
    [".47 µF", undefined, 4.7e-7, "F", "0.47 µF"],
    ["470n", "F", 4.7e-7, "F", "0.47 µF"],
    ["470 nF", undefined, 4.7e-7, "F", "0.47 µF"],
    ["4n7", "F", 4.7e-9, "F", "4.7 nF"],
    ["100p", "F", 1e-10, "F", "100 pF"],
    ["4700 µF", undefined, 4.7e-3, "F", "4700 µF"],
    ["0.47 mH", undefined, 4.7e-4, "H", "0.47 mH"],
    ["2.2 mH", undefined, 2.2e-3, "H", "2.2 mH"],
    ["330 µH", undefined, 3.3e-4, "H", "0.33 mH"],
    ["330uH", "H", 3.3e-4, "H", "0.33 mH"],
    ["0.82 mh", undefined, 8.2e-4, "H", "0.82 mH"],
    ["1m5", "H", 1.5e-3, "H", "1.5 mH"],
    ["8R2", undefined, 8.2, "Ω", "8.2 Ω"],
    ["8R2", "Ω", 8.2, "Ω", "8.2 Ω"],
    ["8r2", undefined, 8.2, "Ω", "8.2 Ω"],
    ["R47", undefined, 0.47, "Ω", "0.47 Ω"],
    ["8.2 Ω", undefined, 8.2, "Ω", "8.2 Ω"],
    ["8.2\u2126", undefined, 8.2, "Ω", "8.2 Ω"], // OHM SIGN U+2126 as well as Greek capital omega
    ["8.2ohm", undefined, 8.2, "Ω", "8.2 Ω"],
    ["8.2 Ohms", undefined, 8.2, "Ω", "8.2 Ω"],
    ["8.2", "Ω", 8.2, "Ω", "8.2 Ω"],
    ["1k5", undefined, 1500, "Ω", "1.5 kΩ"],
    ["1K5", "Ω", 1500, "Ω", "1.5 kΩ"],
    ["4k7Ω", undefined, 4700, "Ω", "4.7 kΩ"],
    ["2M2", undefined, 2.2e6, "Ω", "2.2 MΩ"],
    ["  4.7 \u00a0µF  ", undefined, 4.7e-6, "F", "4.7 µF"],
  ])("%j (expected %s) → %d %s", (text, unit, value, u, display) => {
    const r = parseValue(text, unit);
    expect(r).toEqual({ ok: true, value, unit: u, display });
  });

  test("values are the exact doubles of the decimals typed (no 4.699999… from multiplying)", () => {
    const r = parseValue("4k7");
    expect(r.ok && r.value).toBe(4700);
    const c = parseValue("6.8 µF");
    expect(c.ok && c.value).toBe(6.8e-6);
  });

  test.each<[string, Unit | undefined, RegExp]>([
    ["", undefined, /^Enter a value, for example 4\.7 µF/],
    ["   ", "F", /^Enter a value/],
    ["abc", undefined, /^"abc" is not a value Twinleaf can read\. Write it like 4\.7 µF, 4u7/],
    ["4.7e-6", undefined, /is not a value Twinleaf can read/],
    ["4 7", undefined, /is not a value Twinleaf can read/],
    ["4.7.1µF", undefined, /is not a value Twinleaf can read/],
    ["µF", undefined, /is not a value Twinleaf can read/],
    ["4k7k", undefined, /is not a value Twinleaf can read/],
    ["4.7UF", undefined, /is not a value Twinleaf can read/],
    ["4.7k5", undefined, /^"4\.7k5" uses both a decimal point and a letter as the decimal point/],
    ["-4.7µF", undefined, /^"-4\.7µF" is negative; a component value must be greater than zero\.$/],
    ["−8R2", undefined, /is negative/],
    ["0", "F", /^"0" is zero; a component value must be greater than zero\.$/],
    ["0.0 µF", undefined, /is zero/],
    ["0R0", undefined, /is zero/],
    ["470n", undefined, /^"470n" has no unit; add F, H or Ω \(for example 470 nF\)\.$/],
    ["4u7", undefined, /has no unit/],
    ["4,700 µF", undefined, /^"4,700 µF" is ambiguous.*Write 4\.7 or 4700\.$/],
    ["4.7 µF", "H", /^"4\.7 µF" is a capacitance \(F\), but an inductance \(H\) is expected here\.$/],
    ["0.82 mH", "F", /is an inductance \(H\), but a capacitance \(F\) is expected here/],
    ["8.2 Ω", "H", /is a resistance \(Ω\), but an inductance \(H\) is expected here/],
    ["1k5", "F", /^"1k5" reads as ohms \(k without a unit is used only for resistance\), but a capacitance \(F\) is expected here\.$/],
    ["8R2", "H", /reads as ohms \(R marks the decimal point of a resistance\), but an inductance \(H\)/],
    ["8R2F", undefined, /uses R, which marks the decimal point of a resistance, but its unit is F/],
    ["4.7 MF", undefined, /^"4\.7 MF": M \(mega\) is not used for capacitance; use pF, nF, µF, mF or F\.$/],
    ["1kH", undefined, /k \(kilo\) is not used for inductance; use nH, µH, mH or H/],
    ["470 nΩ", undefined, /n \(nano\) is not used for resistance; use mΩ, Ω, kΩ or MΩ/],
    ["4.7", undefined, /^"4\.7" has no unit; add F, H or Ω \(for example 4\.7 Ω\)\.$/],
  ])("refuses %j (expected %s)", (text, unit, message) => {
    const r = parseValue(text, unit);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toMatch(message);
  });
});

describe("a board row: a bare number is read as the lab means it", () => {
  // Prefix values from the SI Brochure (BIPM, 9th edition, Table 7): p 1e-12, n 1e-9, µ 1e-6, m 1e-3, k 1e3.
  test.each<[string, Unit, number, string, string]>([
    ["4.7", "F", 4.7e-6, "µ", "4.7 µF"], // a capacitor's nominal alone is in µF, how the lab writes it (HOME)
    ["0.82", "H", 8.2e-4, "m", "0.82 mH"], // an inductor's in mH
    ["8.2", "Ω", 8.2, "", "8.2 Ω"], // a resistor's in Ω
    ["4700n", "F", 4.7e-6, "n", "4.7 µF"], // typed in nF: a bare reading against it is read in nF
    ["4u7", "F", 4.7e-6, "µ", "4.7 µF"], // IEC 60062 RKM
    ["1k5", "Ω", 1500, "k", "1.5 kΩ"],
    ["8R2", "Ω", 8.2, "", "8.2 Ω"],
    ["4.7 F", "F", 4.7, "", "4.7 F"], // a unit typed is taken as typed
  ])("nominal %j on a %s position is %d (%s prefix), shown %s", (text, unit, value, prefix, display) => {
    expect(parseNominal(text, unit)).toEqual({ ok: true, value, unit, display, prefix });
  });

  test.each<[string, string, Unit, number, string]>([
    // The case from the lab: nominal 4.7 µF, reading typed 4.72 → 4.72 µF, not 4.72 F.
    ["4.7µF", "4.72", "F", 4.72e-6, "4.72 µF"],
    ["4.7µF", "4,72", "F", 4.72e-6, "4.72 µF"],
    ["4700n", "4710", "F", 4.71e-6, "4.71 µF"], // in the nominal's prefix as typed: nF
    ["0.82 mH", "0.81", "H", 8.1e-4, "0.81 mH"],
    ["330 µH", "329", "H", 3.29e-4, "0.329 mH"],
    ["8R2", "8.19", "Ω", 8.19, "8.19 Ω"],
    ["1k5", "1.49", "Ω", 1490, "1.49 kΩ"],
    ["4.7µF", "4.72µF", "F", 4.72e-6, "4.72 µF"], // a prefix typed is taken as typed
    ["4.7µF", "4720n", "F", 4.72e-6, "4.72 µF"],
    ["4.7µF", "47", "F", 4.7e-5, "47 µF"], // exactly ten times: not "more than ten times", so judged by the tolerance
  ])("nominal %j, reading %j on a %s position is %d, shown %s", (nominal, reading, unit, value, display) => {
    const read = readPartValues({ nominal, reading, unit });
    expect(read.reading).toEqual({ ok: true, value, unit, display });
  });

  test.each<[string, string, Unit, RegExp]>([
    // Read as typed (F, no prefix) and 1,000,000 times the nominal: the slip that failed three boards for good.
    ["4.7µF", "4.72F", "F", /^"4\.72F" reads as 4\.72 F, more than ten times its 4\.7 µF nominal\. That looks like a slip/],
    ["4.7µF", "4.72 mF", "F", /reads as 4\.72 mF, more than ten times its 4\.7 µF nominal/],
    ["4.7µF", "4.72n", "F", /reads as 4\.72 nF, less than a tenth of its 4\.7 µF nominal/],
    ["4700n", "4.72", "F", /^"4\.72" reads as 4\.72 nF \(a number alone is read in nF, as the nominal is written\), less than a tenth of its 4700 nF nominal/],
    ["4.7µF", "48", "F", /reads as 48 µF \(a number alone is read in µF, as the nominal is written\), more than ten times its 4\.7 µF nominal/],
    ["8.2", "0.8", "Ω", /reads as 0\.8 Ω .*less than a tenth of its 8\.2 Ω nominal/],
    ["0.82mH", "8.2 H", "H", /reads as 8\.2 H, more than ten times its 0\.82 mH nominal/],
  ])("nominal %j, reading %j on a %s position is refused as a slip", (nominal, reading, unit, message) => {
    const read = readPartValues({ nominal, reading, unit });
    expect(read.reading?.ok).toBe(false);
    if (read.reading && !read.reading.ok) expect(read.reading.message).toMatch(message);
  });

  test("the slip factor is ten", () => {
    expect(READING_SLIP_FACTOR).toBe(10);
  });

  test("without a usable nominal a bare reading is read as a nominal would be, and no slip is told", () => {
    expect(readPartValues({ nominal: "4.8x", reading: "4.72", unit: "F" }).reading).toEqual({ ok: true, value: 4.72e-6, unit: "F", display: "4.72 µF" });
    expect(parseReading("4720", "F", null)).toEqual({ ok: true, value: 4.72e-3, unit: "F", display: "4720 µF" });
  });

  test("empty fields read as nothing; a reading of the wrong quantity is still refused", () => {
    expect(readPartValues({ nominal: "", reading: " ", unit: "F" })).toEqual({ nominal: null, reading: null });
    const r = readPartValues({ nominal: "4.7µF", reading: "4.7 mH", unit: "F" }).reading;
    expect(r?.ok === false && r.message).toMatch(/is an inductance \(H\), but a capacitance \(F\) is expected here/);
  });

  test("parseValue itself still reads a bare number in the base unit (for lot labels and other callers)", () => {
    expect(parseValue("4.7", "F")).toEqual({ ok: true, value: 4.7, unit: "F", display: "4.7 F" });
  });
});

describe("formatValue writes values as the lab does", () => {
  test.each<[number, Unit, string]>([
    [4.7e-6, "F", "4.7 µF"],
    [0.00082, "H", "0.82 mH"],
    [8.2, "Ω", "8.2 Ω"],
    [4.7e-7, "F", "0.47 µF"],
    [6.8e-8, "F", "68 nF"],
    [1e-10, "F", "100 pF"],
    [4.7e-3, "F", "4700 µF"],
    [0.01, "F", "10 mF"],
    [5e-5, "H", "50 µH"],
    [1.5, "H", "1.5 H"],
    [0.22, "Ω", "0.22 Ω"],
    [0.05, "Ω", "50 mΩ"],
    [1500, "Ω", "1.5 kΩ"],
    [999.96, "Ω", "1 kΩ"], // rounding decides the prefix
    [2.2e6, "Ω", "2.2 MΩ"],
    [6.631455962e-6, "F", "6.631 µF"],
  ])("%d %s → %s", (value, unit, text) => {
    expect(formatValue(value, unit)).toBe(text);
  });

  test("more significant figures on request", () => {
    expect(formatValue(6.631455962e-6, "F", 6)).toBe("6.63146 µF");
  });

  test("formatValue and parseValue round-trip", () => {
    for (const v of [4.7e-6, 0.00082, 8.2, 1500, 6.8e-8, 3.3e-4]) {
      for (const unit of ["F", "H", "Ω"] as Unit[]) {
        const text = formatValue(v, unit);
        const back = parseValue(text, unit);
        if (back.ok) expect(back.value).toBeCloseTo(v, 15);
        else expect(back.message).toMatch(/is not used for/); // e.g. 1.5 kF is refused, as it should be
      }
    }
  });
});

describe("boardVerdict", () => {
  const good: BoardPart[] = [
    { position: "C1", partNumber: "CAP-4U7-J", nominal: 4.7e-6, unit: "F", tolerance: "J", reading: 4.81e-6 },
    { position: "L1", partNumber: "IND-0M82-K", nominal: 0.00082, unit: "H", tolerance: "K", reading: 0.00079 },
    { position: "R1", partNumber: "RES-8R2-J", nominal: 8.2, unit: "Ω", tolerance: "J", reading: 8.31 },
  ];

  test("a good board passes with an empty reasons list", () => {
    const v = boardVerdict(good);
    expect(v.pass).toBe(true);
    expect(v.reasons).toEqual([]);
    expect(v.parts.map((p) => [p.position, p.ok, p.reason])).toEqual([
      ["C1", true, null],
      ["L1", true, null],
      ["R1", true, null],
    ]);
    expect(v.parts[0]?.deviationPct).toBeCloseTo((4.81 / 4.7 - 1) * 100, 10);
  });

  test("a reading exactly at the limit passes", () => {
    const v = boardVerdict([{ ...good[0]!, reading: 4.935e-6 }]);
    expect(v.pass).toBe(true);
  });

  test("a reading outside nominal ± tolerance fails, under and over", () => {
    const v = boardVerdict([
      { ...good[0]!, reading: 4.32e-6 },
      { ...good[2]!, reading: 8.8 },
    ]);
    expect(v.pass).toBe(false);
    expect(v.reasons).toEqual([
      "C1 reads 4.32 µF, 8.1 % under its 4.7 µF nominal; J allows ±5 %",
      "R1 reads 8.8 Ω, 7.3 % over its 8.2 Ω nominal; J allows ±5 %",
    ]);
    expect(v.parts[0]).toEqual({
      position: "C1",
      ok: false,
      reason: "C1 reads 4.32 µF, 8.1 % under its 4.7 µF nominal; J allows ±5 %",
      deviationPct: (4.32e-6 / 4.7e-6 - 1) * 100,
    });
  });

  test("a narrow miss shows enough decimals to be seen as a miss", () => {
    const v = boardVerdict([{ position: "R2", partNumber: "RES-8R2-B", nominal: 8.2, unit: "Ω", tolerance: "B", reading: 8.2086 }]);
    expect(v.reasons).toEqual(["R2 reads 8.2086 Ω, 0.105 % over its 8.2 Ω nominal; B allows ±0.1 %"]);
    const w = boardVerdict([{ ...good[0]!, reading: 4.7e-6 * 1.0504 }]);
    expect(w.reasons).toEqual(["C1 reads 4.93688 µF, 5.04 % over its 4.7 µF nominal; J allows ±5 %"]);
  });

  test("a missing reading fails", () => {
    const v = boardVerdict([good[0]!, { ...good[1]!, reading: null }]);
    expect(v.pass).toBe(false);
    expect(v.reasons).toEqual(["L1 has no reading"]);
    expect(v.parts[1]).toEqual({ position: "L1", ok: false, reason: "L1 has no reading", deviationPct: null });
  });

  test("an off-series nominal fails, even when the reading matches it", () => {
    const v = boardVerdict([{ ...good[0]!, nominal: 4.8e-6, reading: 4.8e-6 }]);
    expect(v.pass).toBe(false);
    expect(v.reasons).toEqual(["C1 is 4.8 µF, which is not an E24 value; the nearest are 4.7 µF and 5.1 µF"]);
    expect(v.parts[0]?.deviationPct).toBe(0);
  });

  test("the series option: 5.1 µF is E24 but not E12", () => {
    const part = { ...good[0]!, nominal: 5.1e-6, reading: 5.1e-6 };
    expect(boardVerdict([part]).pass).toBe(true);
    expect(boardVerdict([part], { series: "E12" }).reasons).toEqual([
      "C1 is 5.1 µF, which is not an E12 value; the nearest are 4.7 µF and 5.6 µF",
    ]);
    expect(() => boardVerdict([part], { series: "E96" as "E24" })).toThrow(/"E96" is not a series/);
  });

  test("several problems on one part are all reported", () => {
    const v = boardVerdict([{ ...good[0]!, nominal: 4.8e-6, reading: null }]);
    expect(v.reasons).toEqual([
      "C1 is 4.8 µF, which is not an E24 value; the nearest are 4.7 µF and 5.1 µF",
      "C1 has no reading",
    ]);
    expect(v.parts[0]?.reason).toBe("C1 is 4.8 µF, which is not an E24 value; the nearest are 4.7 µF and 5.1 µF. C1 has no reading");
  });

  test("bad lab data becomes reasons, never an exception", () => {
    const v = boardVerdict([
      { ...good[0]!, tolerance: "Q" },
      { ...good[1]!, unit: "uF" as Unit },
      { ...good[2]!, nominal: 0 },
      { position: "C3", partNumber: "CAP", nominal: 1e-6, unit: "F", tolerance: "J", reading: -1e-6 },
      { position: "C4", partNumber: "CAP", nominal: 1e-6, unit: "F", tolerance: "J", reading: Number.NaN },
    ]);
    expect(v.pass).toBe(false);
    expect(v.reasons).toEqual([
      'C1: "Q" is not an IEC 60062 tolerance letter; use one of B (±0.1 %), C (±0.25 %), D (±0.5 %), F (±1 %), G (±2 %), J (±5 %), K (±10 %), M (±20 %)',
      'L1 has an unknown unit "uF"; use F, H or Ω',
      "R1 has no usable nominal value (0)",
      "C3 has an unusable reading (-0.000001); measure it again",
      "C4 has an unusable reading (NaN); measure it again",
    ]);
    expect(v.parts.map((p) => p.ok)).toEqual([false, false, false, false, false]);
  });

  test("an empty board, a duplicated position and a part with no position fail", () => {
    expect(boardVerdict([])).toEqual({ pass: false, reasons: ["The board has no parts to check"], parts: [] });
    const dup = boardVerdict([good[0]!, { ...good[0]!, reading: 4.7e-6 }]);
    expect(dup.reasons).toEqual(["C1 is listed 2 times; each position appears once on a board"]);
    const nameless = boardVerdict([{ ...good[0]!, position: " " }]);
    expect(nameless.reasons).toEqual(["The part CAP-4U7-J (no position) needs a position"]);
  });
});

describe("crossoverValues: Dickason, Loudspeaker Design Cookbook (docs/REFERENCES.md, § Crossover networks)", () => {
  const x = crossoverValues(3000, 8);

  test("8 Ω at 3 kHz, first order: 6.631 µF / 0.4244 mH", () => {
    expect(x.firstOrder.capacitance).toBeCloseTo(6.631e-6, 9); // C = 1/(2πfR)
    expect(x.firstOrder.inductance).toBeCloseTo(0.4244e-3, 7); // L = R/(2πf)
    expect(formatValue(x.firstOrder.capacitance, "F")).toBe("6.631 µF");
    expect(formatValue(x.firstOrder.inductance, "H")).toBe("0.4244 mH");
  });

  test("8 Ω at 3 kHz, 2nd-order Linkwitz–Riley: 3.316 µF / 0.8488 mH", () => {
    expect(x.linkwitzRiley2.capacitance).toBeCloseTo(3.316e-6, 9); // C = 1/(4πfR)
    expect(x.linkwitzRiley2.inductance).toBeCloseTo(0.8488e-3, 7); // L = R/(πf)
    expect(formatValue(x.linkwitzRiley2.capacitance, "F")).toBe("3.316 µF");
    expect(formatValue(x.linkwitzRiley2.inductance, "H")).toBe("0.8488 mH");
  });

  test("the formulas' relations hold at another point", () => {
    const y = crossoverValues(2500, 4);
    expect(y.firstOrder.capacitance * 2 * Math.PI * 2500 * 4).toBeCloseTo(1, 12);
    expect(y.linkwitzRiley2.capacitance).toBeCloseTo(y.firstOrder.capacitance / 2, 18);
    expect(y.linkwitzRiley2.inductance).toBeCloseTo(y.firstOrder.inductance * 2, 15);
  });

  test("refuses a frequency or load that is not greater than zero", () => {
    expect(() => crossoverValues(0, 8)).toThrow(/crossover frequency must be a number of hertz greater than zero/);
    expect(() => crossoverValues(3000, -8)).toThrow(/load must be a number of ohms greater than zero/);
    expect(() => crossoverValues(Number.POSITIVE_INFINITY, 8)).toThrow(RangeError);
  });
});

test("lib/crossover-parts is pure: no imports at all", () => {
  const source = readFileSync(new URL("../../lib/crossover-parts/index.ts", import.meta.url), "utf8");
  expect(source).not.toMatch(/^\s*import\s/m);
  expect(source).not.toMatch(/\brequire\(|\bprocess\.|["']server-only["']|\bBuffer\b/);
});
