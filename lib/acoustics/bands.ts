/**
 * One-third-octave bands (IEC 61260-1:2014, base 10) and the band levels of a measured frequency
 * response, for comparing the left and right drive unit of a pair. Pure TypeScript: runs in the
 * browser and on the server alike.
 *
 * Bands: G = 10^(3/10), reference frequency 1000 Hz, b = 3 (odd), so the exact mid-band frequency
 * of band x is fm = 1000·G^(x/3) = 10^(3 + x/10) Hz and its edges are fm·G^(∓1/6) =
 * 10^(3 + (2x ∓ 1)/20) Hz. Each edge is computed from that one expression, so the upper edge of
 * band x and the lower edge of band x+1 are the same floating-point number.
 *
 * Band membership (the edge rule): a point belongs to the band with lowerHz ≤ hz < upperHz. A point
 * exactly on a shared edge therefore counts in the upper band only, never in two bands.
 */

export interface ThirdOctaveBand {
  /** Band index, 0 at 1 kHz, +1 per third octave. */
  x: number;
  /** The ISO 266 preferred name of the band, e.g. "31.5", "1k", "12.5k". */
  nominal: string;
  /** The exact mid-band frequency, Hz. */
  centreHz: number;
  lowerHz: number;
  upperHz: number;
}

export interface ResponsePoint {
  hz: number;
  db: number;
}

/** The band edges and centres as the functions below need them. */
export type BandLike = Pick<ThirdOctaveBand, "nominal" | "centreHz" | "lowerHz" | "upperHz">;

/** Relative tolerance on "the exact centre lies in [minHz, maxHz]", for floating-point noise only. */
const RANGE_TOLERANCE = 1e-9;
/** The most bands one call gives (about 33 decades): a guard against a mistyped range. */
export const MAX_BANDS = 333;
/**
 * |L − R| is compared with the limit plus this many dB, so a difference that is exactly the limit
 * in decimal but comes out a hair above it in floating point (0.5 as 0.5000000001) still passes.
 */
export const LIMIT_EPSILON_DB = 1e-9;

/** ISO 266 preferred numbers for one-third octaves, one decade (R10 series, rounded). */
const DECADE_NAMES = ["1", "1.25", "1.6", "2", "2.5", "3.15", "4", "5", "6.3", "8"] as const;

const exactCentre = (x: number) => Math.pow(10, (30 + x) / 10);
const exactEdge = (twiceXPlusOrMinusOne: number) => Math.pow(10, (60 + twiceXPlusOrMinusOne) / 20);

/**
 * The ISO 266 name of band x: the decade pattern 1, 1.25, 1.6, 2, 2.5, 3.15, 4, 5, 6.3, 8 repeated,
 * written with "k" from 1 kHz and "M" from 1 MHz ("31.5", "1k", "1.25k", "12.5k", "1M").
 */
export function nominalBandName(x: number): string {
  const { mantissa, exponent: e } = nominalParts(x);
  let exponent = e;
  let suffix = "";
  if (exponent >= 6) {
    exponent -= 6;
    suffix = "M";
  } else if (exponent >= 3) {
    exponent -= 3;
    suffix = "k";
  }
  return shiftDecimal(mantissa, exponent) + suffix;
}

/** The ISO 266 nominal frequency of band x in hertz, e.g. 20 for x = −17 (whose exact centre is 19.953 Hz). */
export function nominalBandHz(x: number): number {
  const { mantissa, exponent } = nominalParts(x);
  return Number(shiftDecimal(mantissa, exponent));
}

function nominalParts(x: number): { mantissa: string; exponent: number } {
  if (!Number.isInteger(x)) throw new Error(`Band index ${x} is not a whole number`);
  const step = ((x % 10) + 10) % 10;
  const decade = (x - step) / 10; // band x = DECADE_NAMES[step] × 10^(3 + decade) Hz
  return { mantissa: DECADE_NAMES[step]!, exponent: 3 + decade };
}

/** Moves the decimal point of a plain decimal string by `places` (positive: right), with no rounding noise. */
function shiftDecimal(value: string, places: number): string {
  const [intPart, fracPart = ""] = value.split(".") as [string, string?];
  let digits = intPart + fracPart;
  let point = intPart.length + places;
  if (point <= 0) {
    digits = "0".repeat(1 - point) + digits;
    point = 1;
  } else if (point > digits.length) {
    digits = digits + "0".repeat(point - digits.length);
  }
  const whole = digits.slice(0, point).replace(/^0+(?=\d)/, "");
  const frac = digits.slice(point).replace(/0+$/, "");
  return frac ? `${whole}.${frac}` : whole;
}

const fmtHz = (hz: number) => (Number.isFinite(hz) ? `${Number(hz.toPrecision(6))}` : String(hz));

/**
 * Every base-10 one-third-octave band (IEC 61260-1:2014) whose exact centre lies in
 * [minHz, maxHz] (inclusive, with a relative tolerance of 1e-9 for floating-point noise), or whose
 * ISO 266 nominal frequency does. The second rule is needed because a range is usually typed in
 * nominal values: the band named "20" has its exact centre at 19.953 Hz, 0.24 % below 20, so
 * thirdOctaveBands(20, 20000) must take it by its name; nominal and exact centres differ by under
 * 1 %, far less than the 26 % between neighbouring bands, so no band is ever taken twice or wrongly.
 * Throws an Error with a readable message for a range that is not positive, finite and ordered.
 */
export function thirdOctaveBands(minHz: number, maxHz: number): ThirdOctaveBand[] {
  if (typeof minHz !== "number" || !Number.isFinite(minHz)) throw new Error(`The lowest frequency must be a finite number of hertz, got ${String(minHz)}`);
  if (typeof maxHz !== "number" || !Number.isFinite(maxHz)) throw new Error(`The highest frequency must be a finite number of hertz, got ${String(maxHz)}`);
  if (minHz <= 0) throw new Error(`The lowest frequency must be above 0 Hz, got ${fmtHz(minHz)} Hz`);
  if (maxHz < minHz) throw new Error(`The highest frequency (${fmtHz(maxHz)} Hz) is below the lowest (${fmtHz(minHz)} Hz)`);

  const lo = minHz * (1 - RANGE_TOLERANCE);
  const hi = maxHz * (1 + RANGE_TOLERANCE);
  // fm = 10^(3 + x/10)  ⇔  x = 10·(log10(fm) − 3); one band of slack on each side, then filter exactly.
  const xFrom = Math.floor(10 * (Math.log10(lo) - 3)) - 1;
  const xTo = Math.ceil(10 * (Math.log10(hi) - 3)) + 1;
  if (xTo - xFrom > MAX_BANDS + 2) {
    throw new Error(`${fmtHz(minHz)}–${fmtHz(maxHz)} Hz spans more than ${MAX_BANDS} one-third-octave bands: check the range`);
  }
  const bands: ThirdOctaveBand[] = [];
  for (let x = xFrom; x <= xTo; x++) {
    const centreHz = exactCentre(x);
    const nominalHz = nominalBandHz(x);
    const exactIn = centreHz >= lo && centreHz <= hi;
    const nominalIn = nominalHz >= minHz && nominalHz <= maxHz;
    if (!exactIn && !nominalIn) continue;
    bands.push({ x, nominal: nominalBandName(x), centreHz, lowerHz: exactEdge(2 * x - 1), upperHz: exactEdge(2 * x + 1) });
  }
  return bands;
}

function checkPoints(points: readonly ResponsePoint[], what = "The response"): void {
  if (!Array.isArray(points) || points.length === 0) throw new Error(`${what} has no measured points`);
  points.forEach((p, i) => {
    if (!p || typeof p.hz !== "number" || !Number.isFinite(p.hz) || p.hz <= 0) {
      throw new Error(`${what}: point ${i + 1} has frequency ${String(p?.hz)}; a frequency must be a finite number above 0 Hz`);
    }
    if (typeof p.db !== "number" || !Number.isFinite(p.db)) {
      throw new Error(`${what}: point ${i + 1} (${fmtHz(p.hz)} Hz) has level ${String(p.db)}; a level must be a finite number of dB`);
    }
  });
}

function checkBands(bands: readonly BandLike[]): void {
  if (!Array.isArray(bands) || bands.length === 0) throw new Error("No bands were given");
  bands.forEach((b, i) => {
    const ok = [b?.lowerHz, b?.centreHz, b?.upperHz].every((v) => typeof v === "number" && Number.isFinite(v) && v > 0);
    if (!ok || !(b.lowerHz < b.centreHz && b.centreHz < b.upperHz)) {
      throw new Error(`Band ${i + 1} (${String(b?.nominal)}) needs finite edges with lowerHz < centreHz < upperHz`);
    }
    const prev = bands[i - 1];
    if (prev && b.lowerHz < prev.upperHz) throw new Error(`Band ${b.nominal} overlaps or comes before band ${prev.nominal}: bands must be in increasing order`);
  });
}

/** 10·log10(mean(10^(L/10))), computed relative to the loudest level so large levels cannot overflow. */
export function powerAverageDb(levels: readonly number[]): number {
  if (levels.length === 0) throw new Error("A power average needs at least one level");
  const top = Math.max(...levels);
  let sum = 0;
  for (const l of levels) sum += Math.pow(10, (l - top) / 10);
  return top + 10 * Math.log10(sum / levels.length);
}

/**
 * One level per band, dB.
 *
 * - A band holding measured points (lowerHz ≤ hz < upperHz; see the edge rule above) gets their
 *   power average, 10·log10(mean(10^(L/10))).
 * - An empty band gets the level interpolated linearly in log-frequency, at its centre, between its
 *   nearest neighbours on each side that hold points: each neighbour counts at its own centre with
 *   its own power average (so interpolation is between neighbouring bands, not between raw points).
 *   Beyond the first or last band that holds points (the bands asked for are narrower than the
 *   measurement), the neighbour on that side is the nearest measured point beyond the empty band's
 *   centre.
 * - Where there is no measured point at all at or beyond the centre on one side, the band lies
 *   outside the measured range and the whole call throws: a response that does not cover the bands
 *   is refused rather than extrapolated.
 *
 * Points need not be sorted; a point with a non-finite or non-positive frequency or a non-finite
 * level is refused with an Error.
 */
export function bandLevels(points: readonly ResponsePoint[], bands: readonly BandLike[]): number[] {
  checkPoints(points);
  checkBands(bands);
  const sorted = [...points].sort((a, b) => a.hz - b.hz);

  const averages: (number | null)[] = bands.map((band) => {
    const inside = sorted.filter((p) => p.hz >= band.lowerHz && p.hz < band.upperHz).map((p) => p.db);
    return inside.length ? powerAverageDb(inside) : null;
  });

  return bands.map((band, i) => {
    const own = averages[i];
    if (own != null) return own;
    const below = neighbour(-1);
    const above = neighbour(+1);
    const t = (Math.log10(band.centreHz) - Math.log10(below.hz)) / (Math.log10(above.hz) - Math.log10(below.hz));
    return below.db + t * (above.db - below.db);

    function neighbour(dir: -1 | 1): ResponsePoint {
      for (let j = i + dir; j >= 0 && j < bands.length; j += dir) {
        const level = averages[j];
        if (level != null) return { hz: bands[j]!.centreHz, db: level };
      }
      const beyond =
        dir < 0 ? [...sorted].reverse().find((p) => p.hz <= band.centreHz) : sorted.find((p) => p.hz >= band.centreHz);
      if (!beyond) {
        throw new Error(
          `Band ${band.nominal} Hz holds no measured point and there is no measured point at or beyond ${fmtHz(band.centreHz)} Hz ` +
            `${dir < 0 ? "below" : "above"} it (the response runs ${fmtHz(sorted[0]!.hz)}–${fmtHz(sorted[sorted.length - 1]!.hz)} Hz): ` +
            `the response does not cover the bands`,
        );
      }
      return beyond;
    }
  });
}

/** Per-band a − b, dB. Throws when the lists differ in length or hold a non-finite level. */
export function bandDifferences(a: readonly number[], b: readonly number[]): number[] {
  if (a.length !== b.length) throw new Error(`The two band lists differ in length (${a.length} and ${b.length})`);
  return a.map((av, i) => {
    const bv = b[i]!;
    if (!Number.isFinite(av) || !Number.isFinite(bv)) throw new Error(`Band ${i + 1} has a non-finite level`);
    return av - bv;
  });
}

export interface CompareOptions {
  minHz: number;
  maxHz: number;
  /** The largest |left − right| allowed in any band, dB. */
  limitDb: number;
}

export interface BandComparison {
  nominal: string;
  centreHz: number;
  left: number;
  right: number;
  /** left − right, dB. */
  diffDb: number;
}

export interface ResponseComparison {
  bands: BandComparison[];
  /** The largest |left − right| over the bands, dB. */
  maxAbsDiffDb: number;
  /** The nominal name of the band with the largest |left − right| (the lowest such band on a tie). */
  worstBand: string;
  /** Every band has |left − right| ≤ limitDb (within LIMIT_EPSILON_DB, so a band exactly at the limit passes). */
  pass: boolean;
}

/**
 * Compares a left and a right response band by band over the one-third-octave bands whose centres
 * lie in [minHz, maxHz]. Throws (naming the side) when either response does not cover the bands,
 * and when the range holds no band or the limit is not a finite number ≥ 0.
 */
export function compareResponses(left: readonly ResponsePoint[], right: readonly ResponsePoint[], opts: CompareOptions): ResponseComparison {
  if (!opts || typeof opts.limitDb !== "number" || !Number.isFinite(opts.limitDb) || opts.limitDb < 0) {
    throw new Error(`The limit must be a finite number of dB, 0 or more, got ${String(opts?.limitDb)}`);
  }
  const bands = thirdOctaveBands(opts.minHz, opts.maxHz);
  if (bands.length === 0) throw new Error(`No one-third-octave band centre lies in ${fmtHz(opts.minHz)}–${fmtHz(opts.maxHz)} Hz`);
  const side = (name: string, pts: readonly ResponsePoint[]) => {
    try {
      return bandLevels(pts, bands);
    } catch (e) {
      throw new Error(`${name} response: ${e instanceof Error ? e.message : String(e)}`);
    }
  };
  const l = side("Left", left);
  const r = side("Right", right);
  const diffs = bandDifferences(l, r);
  let worst = 0;
  diffs.forEach((d, i) => {
    if (Math.abs(d) > Math.abs(diffs[worst]!)) worst = i;
  });
  const maxAbsDiffDb = Math.abs(diffs[worst]!);
  return {
    bands: bands.map((b, i) => ({ nominal: b.nominal, centreHz: b.centreHz, left: l[i]!, right: r[i]!, diffDb: diffs[i]! })),
    maxAbsDiffDb,
    worstBand: bands[worst]!.nominal,
    pass: diffs.every((d) => Math.abs(d) <= opts.limitDb + LIMIT_EPSILON_DB),
  };
}
