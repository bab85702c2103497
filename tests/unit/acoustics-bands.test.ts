import { describe, expect, test } from "vitest";
import {
  bandDifferences,
  bandLevels,
  compareResponses,
  LIMIT_EPSILON_DB,
  nominalBandHz,
  nominalBandName,
  powerAverageDb,
  thirdOctaveBands,
  type ResponsePoint,
} from "@/lib/acoustics";

/** Within half a unit of the last digit of a published value, e.g. "89.1251" → ±0.00005. */
function expectPublished(actual: number, published: string) {
  const decimals = published.includes(".") ? published.split(".")[1]!.length : 0;
  expect(Math.abs(actual - Number(published))).toBeLessThanOrEqual(0.5 * 10 ** -decimals + 1e-12);
}

const bandAt = (x: number) => {
  const hz = 1000 * 10 ** (x / 10);
  const band = thirdOctaveBands(hz, hz).find((b) => b.x === x);
  if (!band) throw new Error(`no band ${x}`);
  return band;
};

/** A made-up response: one point every 1/24 octave from `from` to `to` Hz, level from `db(hz)`. */
const sweep = (from: number, to: number, db: (hz: number) => number): ResponsePoint[] => {
  const pts: ResponsePoint[] = [];
  for (let hz = from; hz <= to * 1.0001; hz *= 2 ** (1 / 24)) pts.push({ hz, db: db(hz) });
  return pts;
};

describe("thirdOctaveBands: IEC 61260-1:2014 values", () => {
  // Source: IEC 61260-1:2014, base-10 one-third-octave bands (b = 3, G = 10^(3/10), fr = 1000 Hz),
  // values as tabulated in docs/REFERENCES.md, § One-third-octave bands.
  test.each([
    [-10, "100.000", "89.1251", "112.202"],
    [0, "1000", "891.251", "1122.018"],
    [1, "1258.925", "1122.018", "1412.538"],
    [10, "10000", "8912.51", "11220.18"],
  ])("band x = %i: centre %s Hz, edges %s–%s Hz", (x, centre, lower, upper) => {
    const b = bandAt(x);
    expectPublished(b.centreHz, centre);
    expectPublished(b.lowerHz, lower);
    expectPublished(b.upperHz, upper);
  });

  test("band x = −17 has its exact centre at 19.9526 Hz (IEC 61260-1:2014, via docs/REFERENCES.md, § One-third-octave bands)", () => {
    expectPublished(bandAt(-17).centreHz, "19.9526");
  });

  test("20 Hz to 20 kHz gives the 31 ISO 266 nominal names in order (ISO 266, via docs/REFERENCES.md, § One-third-octave bands)", () => {
    // Source: ISO 266 preferred frequencies for one-third octaves, as listed in docs/REFERENCES.md, § One-third-octave bands.
    const iso266 = "20 25 31.5 40 50 63 80 100 125 160 200 250 315 400 500 630 800 1k 1.25k 1.6k 2k 2.5k 3.15k 4k 5k 6.3k 8k 10k 12.5k 16k 20k".split(" ");
    const bands = thirdOctaveBands(20, 20000);
    expect(bands.map((b) => b.nominal)).toEqual(iso266);
    expect(bands.map((b) => b.x)).toEqual(Array.from({ length: 31 }, (_, i) => i - 17));
  });
});

describe("thirdOctaveBands: behaviour", () => {
  test("adjacent bands share their edges exactly", () => {
    const bands = thirdOctaveBands(10, 40000);
    for (let i = 1; i < bands.length; i++) expect(bands[i]!.lowerHz).toBe(bands[i - 1]!.upperHz);
  });

  test("every centre is the geometric mean of its edges, and each band is one third of an octave wide in base 10", () => {
    for (const b of thirdOctaveBands(20, 20000)) {
      expect(Math.sqrt(b.lowerHz * b.upperHz) / b.centreHz).toBeCloseTo(1, 12);
      expect(b.upperHz / b.lowerHz).toBeCloseTo(10 ** 0.1, 12); // G^(1/3) = 10^(1/10) by definition
    }
  });

  test("names continue the decade pattern beyond 20 Hz–20 kHz", () => {
    expect(thirdOctaveBands(10, 40000).map((b) => b.nominal).slice(0, 3)).toEqual(["10", "12.5", "16"]);
    expect(thirdOctaveBands(10, 40000).map((b) => b.nominal).slice(-3)).toEqual(["25k", "31.5k", "40k"]);
    expect([-40, -31, -30, -21, 20, 21, 30, 31].map(nominalBandName)).toEqual(["0.1", "0.8", "1", "8", "100k", "125k", "1M", "1.25M"]);
    expect(nominalBandHz(-17)).toBe(20);
    expect(nominalBandHz(1)).toBe(1250);
    expect(nominalBandHz(5)).toBe(3150);
  });

  test("a range is matched by exact centre or by nominal frequency, inclusive", () => {
    expect(thirdOctaveBands(1000, 1000).map((b) => b.nominal)).toEqual(["1k"]);
    expect(thirdOctaveBands(1250, 1250).map((b) => b.nominal)).toEqual(["1.25k"]); // nominal 1250, exact 1258.9
    expect(thirdOctaveBands(1258.9254117941675, 1258.9254117941675).map((b) => b.nominal)).toEqual(["1.25k"]);
    expect(thirdOctaveBands(1001, 1249)).toEqual([]);
    expect(thirdOctaveBands(100, 1000).map((b) => b.nominal)).toEqual(["100", "125", "160", "200", "250", "315", "400", "500", "630", "800", "1k"]);
  });

  test.each([
    [0, 100, /above 0 Hz/],
    [-20, 100, /above 0 Hz/],
    [200, 100, /below the lowest/],
    [Number.NaN, 100, /finite number/],
    [20, Number.POSITIVE_INFINITY, /finite number/],
    [1e-300, 1e300, /more than \d+ one-third-octave bands/],
  ])("refuses the range %s–%s Hz", (lo, hi, message) => {
    expect(() => thirdOctaveBands(lo, hi)).toThrow(message);
  });
});

describe("bandLevels", () => {
  test("a flat response gives that level in every band", () => {
    const bands = thirdOctaveBands(20, 20000);
    expect(bandLevels(sweep(15, 25000, () => 85), bands)).toEqual(bands.map(() => 85));
  });

  test("the power average of 80 dB and 90 dB is 10·log10((10^8 + 10^9)/2) ≈ 87.40 dB", () => {
    // Follows from the definition of a power (energy) average of levels.
    expect(powerAverageDb([80, 90])).toBeCloseTo(10 * Math.log10((1e8 + 1e9) / 2), 10);
    expect(powerAverageDb([80, 90])).toBeCloseTo(87.4036, 4);
    const band = thirdOctaveBands(1000, 1000);
    expect(bandLevels([{ hz: 950, db: 80 }, { hz: 1050, db: 90 }], band)[0]).toBeCloseTo(87.4036, 4);
  });

  test("large levels do not overflow the power average", () => {
    expect(powerAverageDb([3000, 3000])).toBe(3000);
  });

  test("an empty band is interpolated linearly in log-frequency between the neighbouring bands that hold points", () => {
    // 80 dB at 100 Hz, 90 dB at 1 kHz: the centres lie at log10 f = 3 + x/10, so band x gets 90 + x dB.
    const bands = thirdOctaveBands(100, 1000);
    const levels = bandLevels([{ hz: 1000, db: 90 }, { hz: 100, db: 80 }], bands); // unsorted on purpose
    bands.forEach((b, i) => expect(levels[i]).toBeCloseTo(90 + b.x, 9));
  });

  test("interpolation uses the neighbouring bands' averages at their centres, not the raw points", () => {
    // Band 100 holds 95 Hz (70 dB) and 105 Hz (80 dB): its level is their power average at its centre, 100 Hz.
    const bands = thirdOctaveBands(100, 160);
    const levels = bandLevels(
      [
        { hz: 95, db: 70 },
        { hz: 105, db: 80 },
        { hz: 160, db: 90 },
      ],
      bands,
    );
    const band100 = powerAverageDb([70, 80]);
    expect(levels[0]).toBeCloseTo(band100, 12);
    // Band 125 (x = −9) is empty: halfway in log-frequency between the centres of 100 (x = −10) and 160 (x = −8).
    expect(levels[1]).toBeCloseTo((band100 + 90) / 2, 9);
    expect(levels[2]).toBe(90);
  });

  test("beyond the last band holding points, the nearest measured point outside the bands is the neighbour", () => {
    // Bands 100 Hz–1 kHz; points at 50 Hz (70 dB, below every band) and 1 kHz (90 dB).
    const bands = thirdOctaveBands(100, 1000);
    const levels = bandLevels([{ hz: 50, db: 70 }, { hz: 1000, db: 90 }], bands);
    const t = Math.log10(100 / 50) / Math.log10(1000 / 50);
    expect(levels[0]).toBeCloseTo(70 + 20 * t, 9);
  });

  test("a point on a shared edge counts in the upper band only", () => {
    const bands = thirdOctaveBands(1000, 1250);
    const edge = bands[0]!.upperHz;
    expect(bands[1]!.lowerHz).toBe(edge);
    const levels = bandLevels([{ hz: 1000, db: 80 }, { hz: edge, db: 90 }], bands);
    expect(levels).toEqual([80, 90]);
    // The lower edge is inside the band.
    expect(bandLevels([{ hz: bands[0]!.lowerHz, db: 70 }, { hz: 1250, db: 75 }], bands)).toEqual([70, 75]);
  });

  test("a response that does not cover the bands is refused", () => {
    const bands = thirdOctaveBands(100, 1000);
    expect(() => bandLevels(sweep(200, 20000, () => 85), bands)).toThrow(/no measured point at or beyond 100 Hz below it/);
    expect(() => bandLevels(sweep(20, 850, () => 85), bands)).toThrow(/no measured point at or beyond 1000 Hz above it/);
  });

  test("bad points are refused", () => {
    const bands = thirdOctaveBands(100, 1000);
    expect(() => bandLevels([], bands)).toThrow(/no measured points/);
    expect(() => bandLevels([{ hz: 100, db: 80 }, { hz: Number.NaN, db: 80 }], bands)).toThrow(/point 2 has frequency NaN/);
    expect(() => bandLevels([{ hz: 100, db: 80 }, { hz: -5, db: 80 }], bands)).toThrow(/point 2 .*above 0 Hz/);
    expect(() => bandLevels([{ hz: 100, db: Number.POSITIVE_INFINITY }], bands)).toThrow(/point 1 \(100 Hz\) has level Infinity/);
  });
});

describe("bandDifferences", () => {
  test("gives a − b per band", () => {
    expect(bandDifferences([85, 86, 84], [84.5, 86, 85])).toEqual([0.5, 0, -1]);
  });
  test("refuses lists of different lengths", () => {
    expect(() => bandDifferences([1, 2], [1])).toThrow(/differ in length/);
  });
});

describe("compareResponses", () => {
  const opts = { minHz: 100, maxHz: 10000, limitDb: 0.5 };
  const flat = (db: number) => sweep(80, 12500, () => db);

  test("reports every band, the largest difference and the worst band", () => {
    const left = flat(85);
    // Right: 1 dB low in band 2k (every made-up point inside its edges), 0.2 dB high elsewhere.
    const [b2k] = thirdOctaveBands(2000, 2000);
    const right = sweep(80, 12500, (hz) => (hz >= b2k!.lowerHz && hz < b2k!.upperHz ? 84 : 85.2));
    const r = compareResponses(left, right, opts);
    expect(r.bands).toHaveLength(21);
    expect(r.bands[0]).toMatchObject({ nominal: "100", centreHz: 100 });
    expect(r.worstBand).toBe("2k");
    expect(r.maxAbsDiffDb).toBeCloseTo(1, 12);
    expect(r.bands.find((b) => b.nominal === "1k")!.diffDb).toBeCloseTo(-0.2, 12);
    expect(r.pass).toBe(false);
  });

  test("a band exactly at the limit passes", () => {
    const r = compareResponses(flat(85), flat(84.5), opts);
    expect(r.maxAbsDiffDb).toBe(0.5);
    expect(r.pass).toBe(true);
    expect(compareResponses(flat(84.5), flat(85), opts).pass).toBe(true); // |L − R|, either sign
  });

  test("a difference that is the limit up to floating-point noise passes", () => {
    // 1.1 − 0.6 is 0.5000000000000001 in binary floating point.
    expect(1.1 - 0.6).toBeGreaterThan(0.5);
    const r = compareResponses(flat(1.1), flat(0.6), opts);
    expect(r.maxAbsDiffDb).toBeGreaterThan(0.5);
    expect(r.maxAbsDiffDb - 0.5).toBeLessThan(LIMIT_EPSILON_DB);
    expect(r.pass).toBe(true);
  });

  test("0.001 dB over the limit fails", () => {
    const r = compareResponses(flat(85), flat(84.499), opts);
    expect(r.maxAbsDiffDb).toBeCloseTo(0.501, 9);
    expect(r.pass).toBe(false);
  });

  test("names the side whose response does not cover the bands", () => {
    expect(() => compareResponses(flat(85), sweep(300, 12500, () => 85), opts)).toThrow(/^Right response: .*no measured point at or beyond 100 Hz/);
    expect(() => compareResponses(sweep(80, 5000, () => 85), flat(85), opts)).toThrow(/^Left response: /);
  });

  test("refuses a bad limit or an empty range", () => {
    expect(() => compareResponses(flat(85), flat(85), { ...opts, limitDb: -1 })).toThrow(/limit/);
    expect(() => compareResponses(flat(85), flat(85), { ...opts, limitDb: Number.NaN })).toThrow(/limit/);
    expect(() => compareResponses(flat(85), flat(85), { minHz: 1001, maxHz: 1249, limitDb: 0.5 })).toThrow(/No one-third-octave band/);
  });
});
