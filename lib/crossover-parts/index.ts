/**
 * Component values for crossover boards: reading what the lab types ("4u7", "0.82 mH", "8R2"),
 * writing values back the way the lab writes them, the IEC 60063 preferred-value series, the
 * IEC 60062 tolerance letters, the verdict on a built board and the textbook crossover values a
 * design can be checked against.
 *
 * Pure TypeScript: no server-only, no Node-only APIs, no dependencies, so the same code runs in a
 * form on the bench and on the server.
 *
 * Sources (see docs/REFERENCES.md, § Crossover networks):
 * - IEC 60063:2015 Table 1 for the E6, E12 and E24 series (hard-coded; see E_SERIES).
 * - IEC 60062 for the tolerance letters and the RKM code (a letter as the decimal point: 4k7, 8R2).
 * - Dickason, Loudspeaker Design Cookbook, for the first-order and 2nd-order Linkwitz–Riley formulas.
 */

export type Unit = "F" | "H" | "Ω";
export type SeriesName = "E6" | "E12" | "E24";

const UNITS: readonly Unit[] = ["F", "H", "Ω"];
const isUnit = (u: unknown): u is Unit => typeof u === "string" && (UNITS as readonly string[]).includes(u);

const QUANTITY: Record<Unit, string> = {
  F: "a capacitance (F)",
  H: "an inductance (H)",
  Ω: "a resistance (Ω)",
};
const QUANTITY_NOUN: Record<Unit, string> = { F: "capacitance", H: "inductance", Ω: "resistance" };

// ---------------------------------------------------------------------------------------------
// SI prefixes

type Prefix = "p" | "n" | "µ" | "m" | "" | "k" | "M";
const PREFIXES: readonly Prefix[] = ["p", "n", "µ", "m", "", "k", "M"];

const PREFIX_EXPONENT: Record<Prefix, number> = { p: -12, n: -9, µ: -6, m: -3, "": 0, k: 3, M: 6 };
const PREFIX_NAME: Record<Prefix, string> = {
  p: "p (pico)",
  n: "n (nano)",
  µ: "µ (micro)",
  m: "m (milli)",
  "": "no prefix",
  k: "k (kilo)",
  M: "M (mega)",
};

/**
 * The prefixes that make sense for each quantity on a loudspeaker crossover, smallest first.
 * Anything else ("4.7 MF", "1k5 H", "470 nΩ") is refused as a slip of the keyboard: megafarads,
 * kilohenries and nano-ohms are not component values.
 */
const PREFIXES_FOR: Record<Unit, readonly Prefix[]> = {
  F: ["p", "n", "µ", "m", ""],
  H: ["n", "µ", "m", ""],
  Ω: ["m", "", "k", "M"],
};

/**
 * How the lab writes each quantity: capacitors in µF (0.1 µF up to 4700 µF), inductors in mH
 * (0.1 mH up to 999 mH), resistors in Ω (0.1 Ω up to 999 Ω). Outside that range the usual
 * engineering prefix is used (68 nF, 50 µH, 1.5 kΩ).
 */
const HOME: Record<Unit, { prefix: Prefix; min: number; max: number }> = {
  F: { prefix: "µ", min: 0.1, max: 10_000 },
  H: { prefix: "m", min: 0.1, max: 1_000 },
  Ω: { prefix: "", min: 0.1, max: 1_000 },
};

/** value expressed in prefix units, rounded to `digits` significant figures. */
function scaled(value: number, prefix: Prefix, digits: number): number {
  const e = PREFIX_EXPONENT[prefix];
  // Multiply or divide by an exact power of ten (10 ** -6 is not exact; 10 ** 6 is).
  const v = e < 0 ? value * 10 ** -e : value / 10 ** e;
  return Number(v.toPrecision(digits));
}

function choosePrefix(value: number, unit: Unit, digits: number): Prefix {
  const home = HOME[unit];
  const inHome = scaled(value, home.prefix, digits);
  if (inHome >= home.min && inHome < home.max) return home.prefix;
  const prefixes = PREFIXES_FOR[unit];
  let chosen: Prefix = prefixes[0] ?? "";
  for (const p of prefixes) if (scaled(value, p, digits) >= 1) chosen = p;
  return chosen;
}

function formatIn(value: number, unit: Unit, prefix: Prefix, digits: number): string {
  return `${String(scaled(value, prefix, digits))} ${prefix}${unit}`;
}

const clampDigits = (d: number) => Math.min(15, Math.max(1, Math.round(d)));

/**
 * A value in SI base units as the lab writes it: formatValue(4.7e-6, "F") → "4.7 µF",
 * formatValue(0.00082, "H") → "0.82 mH", formatValue(8.2, "Ω") → "8.2 Ω". Shows at most
 * `significantDigits` (default 4) significant figures, trailing zeros dropped.
 */
export function formatValue(value: number, unit: Unit, significantDigits = 4): string {
  const digits = clampDigits(significantDigits);
  if (!isUnit(unit)) return `${String(value)} ${String(unit)}`;
  if (!Number.isFinite(value)) return `${String(value)} ${unit}`;
  if (value === 0) return `0 ${HOME[unit].prefix}${unit}`;
  if (value < 0) return `-${formatValue(-value, unit, digits)}`;
  return formatIn(value, unit, choosePrefix(value, unit, digits), digits);
}

// ---------------------------------------------------------------------------------------------
// Reading typed values

export type ParsedValue =
  | { ok: true; value: number; unit: Unit; display: string }
  | { ok: false; message: string };

const EXAMPLES = "4.7 µF, 4u7, 470n, 0.82 mH, 330 µH, 8.2 Ω, 8R2 or 1k5";

/** Letters read as a multiplier or as the RKM decimal point (IEC 60062), after normalising. */
const LETTER = "[pnµmkKMR]";
const DECIMAL_FORM = new RegExp(`^(\\d*)(?:([.,])(\\d+))?\\s*(${LETTER}?)\\s*([FHΩ]?)$`);
const RKM_FORM = new RegExp(`^(\\d*)(${LETTER})(\\d+)\\s*([FHΩ]?)$`);

function normalise(text: string): string {
  return (
    text
      .normalize("NFC") // U+2126 OHM SIGN becomes U+03A9 Ω
      .replace(/\u03BC/g, "µ") // Greek small mu → micro sign
      .replace(/\s+/g, " ")
      .trim()
      // "ohm", "ohms", "Ohm" as the unit
      .replace(/\s*ohms?$/i, "Ω")
      // u for micro (keyboards without µ); r for the RKM R
      .replace(/u/g, "µ")
      .replace(/(\d)r(\d|$)/g, "$1R$2")
      .replace(/^r(\d)/, "R$1")
      // a lower-case unit letter at the end ("4.7uf", "0.82 mh")
      .replace(/f$/, "F")
      .replace(/h$/, "H")
  );
}

type ReadValue = (ParsedValue & { ok: false }) | { ok: true; value: number; unit: Unit; display: string; prefix: Prefix; bare: boolean };

/**
 * Read a component value as the lab writes it. Accepts a decimal point or comma ("4.7µF",
 * "4,7 µF", "0.47 mH"), the SI prefixes p n µ/u m k M, the IEC 60062 RKM code where the letter is
 * the decimal point ("4k7", "8R2", "4u7", "R47"), and the unit as F, H, Ω or "ohm". A unit may be
 * left out when `unit` says what is expected ("470n" for a capacitor); R, k and M without a unit
 * mean ohms. Refuses nonsense, zero, negative values, a prefix that does not belong to the
 * quantity and a unit that disagrees with the expected one, each with a message for the lab.
 *
 * A comma is a decimal mark ("4,7" is 4.7). "4,700" is refused as ambiguous (4.7 or 4700?).
 * A bare number is read in the base unit here ("4.7" for F is 4.7 F); what the lab types into a
 * board's rows goes through `parseNominal` and `parseReading`, which read it as the lab means it.
 */
export function parseValue(text: string, unit?: Unit): ParsedValue {
  const r = readValue(text, unit, null);
  return r.ok ? { ok: true, value: r.value, unit: r.unit, display: r.display } : r;
}

/** A value as typed, with the prefix it is written in: what a bare reading against it is read in. */
export type ParsedNominal = { ok: true; value: number; unit: Unit; display: string; prefix: string } | { ok: false; message: string };

/**
 * A nominal as typed into a board's row. A number with no prefix and no unit is read in the unit
 * the lab writes that quantity in (µF, mH, Ω: see HOME), so "4.7" on a capacitor is 4.7 µF, never
 * 4.7 F. `prefix` is the prefix the nominal is written in ("4700n" → n, "4u7" → µ, "8R2" → none).
 */
export function parseNominal(text: string, unit?: Unit): ParsedNominal {
  const r = readValue(text, unit, unit !== undefined && isUnit(unit) ? HOME[unit].prefix : null);
  return r.ok ? { ok: true, value: r.value, unit: r.unit, display: r.display, prefix: r.prefix } : r;
}

/**
 * How far a reading may lie from its nominal before it is refused as a slip rather than judged:
 * ten times, either way. A part that far off is not a part out of tolerance but a reading typed in
 * the wrong unit (4.72 F for 4.72 µF) or with the decimal point in the wrong place.
 */
export const READING_SLIP_FACTOR = 10;

/**
 * A reading as typed into a board's row, against its nominal. A number with no prefix and no unit
 * takes the nominal's unit, prefix included ("4.72" against 4.7 µF is 4.72 µF; against 4700 nF it
 * is 4.72 nF, and so refused as a slip). A reading more than READING_SLIP_FACTOR times away from
 * the nominal, either way, is refused with what was read and what was expected: nothing should be
 * recorded from it. Without a usable nominal (`nominal` null) a bare number is read as a nominal
 * would be and no slip can be told.
 */
export function parseReading(text: string, unit: Unit | undefined, nominal: { value: number; unit: Unit; prefix: string } | null): ParsedValue {
  const usable = nominal !== null && isUnit(nominal.unit) && Number.isFinite(nominal.value) && nominal.value > 0 && (PREFIXES as readonly string[]).includes(nominal.prefix);
  if (!usable) {
    const r = parseNominal(text, unit);
    return r.ok ? { ok: true, value: r.value, unit: r.unit, display: r.display } : r;
  }
  const r = readValue(text, unit ?? nominal.unit, nominal.prefix as Prefix);
  if (!r.ok) return r;
  const ratio = r.value / nominal.value;
  const limit = READING_SLIP_FACTOR * (1 + TOLERANCE_EPSILON);
  if (r.unit === nominal.unit && (ratio > limit || 1 / ratio > limit)) {
    const shown = text.trim();
    // Both as written, so the lab sees its own figures: "4.72 F" against "4.7 µF".
    const read = formatIn(r.value, r.unit, r.prefix, 6);
    const expected = formatIn(nominal.value, nominal.unit, nominal.prefix as Prefix, 6);
    const how = ratio > 1 ? "more than ten times" : "less than a tenth of";
    const bareNote = r.bare ? ` (a number alone is read in ${nominal.prefix}${nominal.unit}, as the nominal is written)` : "";
    return {
      ok: false,
      message: `"${shown}" reads as ${read}${bareNote}, ${how} its ${expected} nominal. That looks like a slip of the unit or the decimal point: check the reading and type it again.`,
    };
  }
  return { ok: true, value: r.value, unit: r.unit, display: r.display };
}

/**
 * A board row's nominal and reading as the lab typed them, read the way the server records them:
 * the one function both the bench form's preview and `buildCrossover` call, so they never
 * disagree. Either is null when its text is empty.
 */
export function readPartValues(input: { nominal: string; reading: string; unit?: Unit }): { nominal: ParsedNominal | null; reading: ParsedValue | null } {
  const nominal = input.nominal.trim() ? parseNominal(input.nominal, input.unit) : null;
  const unit = nominal?.ok ? nominal.unit : input.unit;
  const reading = input.reading.trim() ? parseReading(input.reading, unit, nominal?.ok ? nominal : null) : null;
  return { nominal, reading };
}

function readValue(text: string, unit: Unit | undefined, barePrefix: Prefix | null): ReadValue {
  if (typeof text !== "string" || text.trim() === "") {
    return { ok: false, message: `Enter a value, for example ${EXAMPLES}.` };
  }
  if (unit !== undefined && !isUnit(unit)) {
    return { ok: false, message: `"${String(unit)}" is not a unit Twinleaf knows; use F, H or Ω.` };
  }
  const shown = text.trim();
  let s = normalise(text);
  if (/^[-\u2212\u2013]/.test(s)) {
    return { ok: false, message: `"${shown}" is negative; a component value must be greater than zero.` };
  }
  if (s.startsWith("+")) s = s.slice(1).trimStart();

  let intPart: string;
  let fracPart: string;
  let letter: string;
  let textUnit: string;
  let decimalMark = "";
  const dec = DECIMAL_FORM.exec(s);
  const rkm = RKM_FORM.exec(s);
  if (dec && (dec[1] !== "" || dec[3] !== undefined)) {
    intPart = dec[1] ?? "";
    decimalMark = dec[2] ?? "";
    fracPart = dec[3] ?? "";
    letter = dec[4] ?? "";
    textUnit = dec[5] ?? "";
  } else if (rkm) {
    intPart = rkm[1] ?? "";
    letter = rkm[2] ?? "";
    fracPart = rkm[3] ?? "";
    textUnit = rkm[4] ?? "";
  } else {
    if (/\d[.,]\d+\s*[pnµmkKMR]\d/.test(s)) {
      return {
        ok: false,
        message: `"${shown}" uses both a decimal point and a letter as the decimal point; write 4.7k or 4k7, not both.`,
      };
    }
    return { ok: false, message: `"${shown}" is not a value Twinleaf can read. Write it like ${EXAMPLES}.` };
  }

  if (decimalMark === "," && fracPart.length === 3 && intPart !== "" && !/^0+$/.test(intPart)) {
    return {
      ok: false,
      message: `"${shown}" is ambiguous: is the comma a decimal mark or a thousands separator? Write ${Number(`${intPart}.${fracPart}`)} or ${Number(intPart + fracPart)}.`,
    };
  }

  // A bare number ("4.72") with a quantity known is written in `barePrefix` (the nominal's, say).
  const bare = letter === "" && textUnit === "" && unit !== undefined && barePrefix !== null;
  const prefix: Prefix = bare ? barePrefix : letter === "R" ? "" : letter === "K" ? "k" : (letter as Prefix);
  const value = Number(`${intPart || "0"}.${fracPart || "0"}e${PREFIX_EXPONENT[prefix]}`);
  if (!Number.isFinite(value)) {
    return { ok: false, message: `"${shown}" is too large to be a component value.` };
  }
  if (value === 0) {
    return { ok: false, message: `"${shown}" is zero; a component value must be greater than zero.` };
  }

  // Which quantity: the unit written, else what R, k or M imply (ohms), else the expected one.
  let resolved: Unit | null = textUnit === "" ? null : (textUnit as Unit);
  if (letter === "R" && resolved !== null && resolved !== "Ω") {
    return {
      ok: false,
      message: `"${shown}" uses R, which marks the decimal point of a resistance, but its unit is ${resolved}.`,
    };
  }
  const implied: Unit | null = resolved === null && /^[RkKM]$/.test(letter) ? "Ω" : null;
  resolved ??= implied ?? unit ?? null;
  if (resolved === null) {
    return {
      ok: false,
      message: `"${shown}" has no unit; add F, H or Ω (for example ${Number(`${intPart || "0"}.${fracPart || "0"}`)} ${prefix}${prefix === "" ? "Ω" : "F"}).`,
    };
  }
  if (unit !== undefined && resolved !== unit) {
    const reads =
      implied === null
        ? `is ${QUANTITY[resolved]}`
        : letter === "R"
          ? "reads as ohms (R marks the decimal point of a resistance)"
          : `reads as ohms (${letter} without a unit is used only for resistance)`;
    return { ok: false, message: `"${shown}" ${reads}, but ${QUANTITY[unit]} is expected here.` };
  }
  if (!PREFIXES_FOR[resolved].includes(prefix)) {
    const names = PREFIXES_FOR[resolved].map((p) => `${p}${resolved}`);
    const allowed = `${names.slice(0, -1).join(", ")} or ${names.at(-1) ?? ""}`;
    return {
      ok: false,
      message: `"${shown}": ${PREFIX_NAME[prefix]} is not used for ${QUANTITY_NOUN[resolved]}; use ${allowed}.`,
    };
  }
  return { ok: true, value, unit: resolved, display: formatValue(value, resolved, 12), prefix, bare };
}

// ---------------------------------------------------------------------------------------------
// IEC 60063 preferred values

/**
 * IEC 60063:2015 Table 1, two-digit series, mantissas of one decade. Hard-coded: the standard's
 * values are not 10^(k/n) rounded (E24 differs from naive rounding at 2.7 3.0 3.3 3.6 3.9 4.3 4.7
 * and 8.2; the unit test derives these).
 * - E12 and E24: as listed in docs/REFERENCES.md, § Crossover networks.
 * - E6: IEC 60063:2015 Table 1 (E6 column), which takes every second
 *   E12 value (the test checks that). Seen reproduced at
 *   https://www.qsl.net/g4usp/Components/Component%20preferred%20values.htm.
 */
export const E_SERIES: Readonly<Record<SeriesName, readonly number[]>> = Object.freeze({
  E6: Object.freeze([1.0, 1.5, 2.2, 3.3, 4.7, 6.8]),
  E12: Object.freeze([1.0, 1.2, 1.5, 1.8, 2.2, 2.7, 3.3, 3.9, 4.7, 5.6, 6.8, 8.2]),
  E24: Object.freeze([
    1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2,
    6.8, 7.5, 8.2, 9.1,
  ]),
});

/**
 * A value counts as on a series when it is within ±0.5 % of a preferred value times a power of ten.
 * 0.5 % absorbs a nominal typed from a rounded calculation or a datasheet's three digits (4.72 µF)
 * while staying far inside half the narrowest E24 step (about 4 %), so no value is ever on-series
 * by being "near enough" to the wrong neighbour.
 */
export const ON_SERIES_TOLERANCE = 0.005;

const SERIES_NAMES = Object.keys(E_SERIES) as SeriesName[];

function seriesTable(series: string): readonly number[] {
  const table = (E_SERIES as Record<string, readonly number[] | undefined>)[series];
  if (!table) throw new RangeError(`"${series}" is not a series Twinleaf checks; use ${SERIES_NAMES.join(", ")}.`);
  return table;
}

/** Preferred values around `value` (three decades), ascending, with their mantissas. */
function preferredAround(value: number, table: readonly number[]): { preferred: number; mantissa: number }[] {
  const d = Math.floor(Math.log10(value));
  const out: { preferred: number; mantissa: number }[] = [];
  for (const decade of [d - 1, d, d + 1]) {
    // Through a decimal string, so 4.7 in the 10^-6 decade is exactly the double nearest 4.7e-6.
    for (const mantissa of table) out.push({ preferred: Number(`${mantissa}e${decade}`), mantissa });
  }
  return out;
}

export type NearestPreferred = { preferred: number; mantissa: number; onSeries: boolean; deviationPct: number };

/**
 * The preferred value of `series` nearest to `value` (nearest by ratio, as the series is
 * geometric), its mantissa, whether `value` is on the series (within ON_SERIES_TOLERANCE, ±0.5 %)
 * and how far `value` lies from it in percent (positive: above).
 */
export function nearestPreferred(value: number, series: SeriesName): NearestPreferred {
  if (!Number.isFinite(value) || value <= 0) {
    throw new RangeError(`A component value must be a number greater than zero (got ${String(value)}).`);
  }
  const table = seriesTable(series);
  let best: { preferred: number; mantissa: number; distance: number } | null = null;
  for (const c of preferredAround(value, table)) {
    const distance = Math.abs(Math.log(value / c.preferred));
    if (best === null || distance < best.distance) best = { ...c, distance };
  }
  // preferredAround always returns candidates, so best is set.
  const { preferred, mantissa } = best!;
  const ratio = value / preferred - 1;
  return {
    preferred,
    mantissa,
    onSeries: Math.abs(ratio) <= ON_SERIES_TOLERANCE * (1 + 1e-9),
    deviationPct: ratio * 100,
  };
}

/** The message for an off-series value, or null when it is on the series. */
function offSeries(value: number, unit: Unit, series: SeriesName): { shown: string; tail: string } | null {
  const table = seriesTable(series);
  if (nearestPreferred(value, series).onSeries) return null;
  const around = preferredAround(value, table).map((c) => c.preferred);
  const below = around.filter((p) => p < value).at(-1);
  const above = around.find((p) => p > value);
  // Name the neighbours in the same prefix as the value: 95 nF, between 91 nF and 100 nF.
  const prefix = choosePrefix(value, unit, 4);
  const fmt = (v: number | undefined) => (v === undefined ? "?" : formatIn(v, unit, prefix, 4));
  return {
    shown: formatIn(value, unit, prefix, 4),
    tail: `not an ${series} value; the nearest are ${fmt(below)} and ${fmt(above)}`,
  };
}

/**
 * Whether a nominal value is on a preferred series (default E24), with a message naming the
 * preferred values below and above when it is not:
 * "4.8 µF is not an E24 value; the nearest are 4.7 µF and 5.1 µF."
 */
export function checkNominal(
  value: number,
  unit: Unit,
  series: SeriesName = "E24",
): { ok: true } | { ok: false; message: string } {
  if (!isUnit(unit)) return { ok: false, message: `"${String(unit)}" is not a unit Twinleaf knows; use F, H or Ω.` };
  if (!Number.isFinite(value) || value <= 0) {
    return { ok: false, message: `A nominal value must be greater than zero (got ${String(value)}).` };
  }
  if (!SERIES_NAMES.includes(series)) {
    return { ok: false, message: `"${String(series)}" is not a series Twinleaf checks; use ${SERIES_NAMES.join(", ")}.` };
  }
  const off = offSeries(value, unit, series);
  return off ? { ok: false, message: `${off.shown} is ${off.tail}.` } : { ok: true };
}

// ---------------------------------------------------------------------------------------------
// IEC 60062 tolerance letters

export type ToleranceLetter = "B" | "C" | "D" | "F" | "G" | "J" | "K" | "M";

/** IEC 60062 tolerance letters as fractions of the nominal value (B ±0.1 % … M ±20 %). */
export const TOLERANCE_LETTERS: Readonly<Record<ToleranceLetter, number>> = Object.freeze({
  B: 0.001,
  C: 0.0025,
  D: 0.005,
  F: 0.01,
  G: 0.02,
  J: 0.05,
  K: 0.1,
  M: 0.2,
});

const pct = (fraction: number) => Number((fraction * 100).toPrecision(12));

const KNOWN_LETTERS = (Object.entries(TOLERANCE_LETTERS) as [ToleranceLetter, number][])
  .map(([l, f]) => `${l} (±${pct(f)} %)`)
  .join(", ");

function lookupTolerance(letter: unknown): number | null {
  if (typeof letter !== "string") return null;
  const key = letter.trim().toUpperCase();
  return Object.hasOwn(TOLERANCE_LETTERS, key) ? TOLERANCE_LETTERS[key as ToleranceLetter] : null;
}

const unknownLetter = (letter: unknown) =>
  `"${String(letter)}" is not an IEC 60062 tolerance letter; use one of ${KNOWN_LETTERS}.`;

/**
 * The tolerance of an IEC 60062 letter as a fraction: toleranceOf("J") → 0.05. Case and
 * surrounding spaces are ignored. Throws a RangeError naming the known letters otherwise.
 */
export function toleranceOf(letter: string): number {
  const t = lookupTolerance(letter);
  if (t === null) throw new RangeError(unknownLetter(letter));
  return t;
}

/**
 * Relative slack on the tolerance limit: a reading passes when |deviation| ≤ limit · (1 + 1e-9).
 * It only absorbs floating-point error (4.935 µF against 4.7 µF J computes to 5.000000000000002 %),
 * so a reading exactly at the limit passes and 5.01 % on a ±5 % part fails.
 */
export const TOLERANCE_EPSILON = 1e-9;

/**
 * Whether a reading lies within nominal ± the tolerance of `letter` (limit included). Returns the
 * deviation in percent (negative: under) and the limit in percent. Throws a RangeError for an
 * unknown letter, a nominal that is not greater than zero, or a reading that is not a number of
 * zero or more.
 */
export function withinTolerance(
  reading: number,
  nominal: number,
  letter: string,
): { ok: boolean; deviationPct: number; limitPct: number } {
  const tolerance = toleranceOf(letter);
  if (!Number.isFinite(nominal) || nominal <= 0) {
    throw new RangeError(`A nominal value must be a number greater than zero (got ${String(nominal)}).`);
  }
  if (!Number.isFinite(reading) || reading < 0) {
    throw new RangeError(`A reading must be a number of zero or more (got ${String(reading)}).`);
  }
  const ratio = reading / nominal - 1;
  return {
    ok: Math.abs(ratio) <= tolerance * (1 + TOLERANCE_EPSILON),
    deviationPct: ratio * 100,
    limitPct: pct(tolerance),
  };
}

/** A deviation for a message: one decimal, more when one decimal would hide that it is over. */
function showDeviation(absPct: number, limitPct: number, failed: boolean): string {
  let decimals = 1;
  let shown = absPct.toFixed(decimals);
  while (failed && Number(shown) <= limitPct && decimals < 6) shown = absPct.toFixed(++decimals);
  return shown;
}

// ---------------------------------------------------------------------------------------------
// The board verdict

export type BoardPart = {
  position: string;
  partNumber: string;
  nominal: number;
  unit: Unit;
  tolerance: string;
  reading: number | null;
};

export type BoardVerdict = {
  pass: boolean;
  reasons: string[];
  parts: { position: string; ok: boolean; reason: string | null; deviationPct: number | null }[];
};

const READING_DIGITS = 6;

/**
 * The verdict on a built crossover board. A board fails when it has no parts, a position appears
 * twice, a nominal is not on the series (default E24), a tolerance letter is unknown, a reading is
 * missing ("C1 has no reading") or a reading lies outside nominal ± tolerance
 * ("C1 reads 4.32 µF, 8.1 % under its 4.7 µF nominal; J allows ±5 %"). Every problem is one entry
 * of `reasons` (empty when the board passes); each part's `reason` joins its own with ". " (the
 * reasons themselves contain semicolons). Readings are shown to 6 significant figures, in the
 * prefix of the nominal, so a B (±0.1 %) miss is visible.
 * Throws a RangeError only for an unknown `opts.series` (a programming error, not lab data).
 */
export function boardVerdict(parts: BoardPart[], opts?: { series?: SeriesName }): BoardVerdict {
  const series = opts?.series ?? "E24";
  seriesTable(series);
  const reasons: string[] = [];
  if (parts.length === 0) reasons.push("The board has no parts to check");

  const seen = new Map<string, number>();
  for (const p of parts) {
    const key = typeof p.position === "string" ? p.position.trim() : "";
    if (key) seen.set(key, (seen.get(key) ?? 0) + 1);
  }
  const reported = new Set<string>();

  const results = parts.map((p) => {
    const problems: string[] = [];
    const position = typeof p.position === "string" ? p.position.trim() : "";
    const name = position || `The part ${p.partNumber || "with no part number"} (no position)`;
    if (!position) problems.push(`${name} needs a position`);
    const count = seen.get(position) ?? 0;
    if (position && count > 1 && !reported.has(position)) {
      reported.add(position);
      problems.push(`${position} is listed ${count} times; each position appears once on a board`);
    }

    let deviationPct: number | null = null;
    const unitOk = isUnit(p.unit);
    const nominalOk = typeof p.nominal === "number" && Number.isFinite(p.nominal) && p.nominal > 0;
    if (!unitOk) problems.push(`${name} has an unknown unit "${String(p.unit)}"; use F, H or Ω`);
    if (!nominalOk) problems.push(`${name} has no usable nominal value (${String(p.nominal)})`);
    if (unitOk && nominalOk) {
      const off = offSeries(p.nominal, p.unit, series);
      if (off) problems.push(`${name} is ${off.shown}, which is ${off.tail}`);
    }
    const tolerance = lookupTolerance(p.tolerance);
    if (tolerance === null) problems.push(`${name}: ${unknownLetter(p.tolerance).replace(/\.$/, "")}`);

    if (p.reading === null || p.reading === undefined) {
      problems.push(`${name} has no reading`);
    } else if (typeof p.reading !== "number" || !Number.isFinite(p.reading) || p.reading < 0) {
      problems.push(`${name} has an unusable reading (${String(p.reading)}); measure it again`);
    } else if (nominalOk) {
      deviationPct = (p.reading / p.nominal - 1) * 100;
      if (tolerance !== null && unitOk) {
        const r = withinTolerance(p.reading, p.nominal, p.tolerance);
        if (!r.ok) {
          const prefix = choosePrefix(p.nominal, p.unit, 4);
          const dev = showDeviation(Math.abs(r.deviationPct), r.limitPct, true);
          problems.push(
            `${name} reads ${formatIn(p.reading, p.unit, prefix, READING_DIGITS)}, ${dev} % ${r.deviationPct < 0 ? "under" : "over"} ` +
              `its ${formatIn(p.nominal, p.unit, prefix, 4)} nominal; ${p.tolerance.trim().toUpperCase()} allows ±${r.limitPct} %`,
          );
        }
      }
    }

    reasons.push(...problems);
    return {
      position: typeof p.position === "string" ? p.position : "",
      ok: problems.length === 0,
      reason: problems.length ? problems.join(". ") : null,
      deviationPct,
    };
  });

  return { pass: reasons.length === 0, reasons, parts: results };
}

// ---------------------------------------------------------------------------------------------
// Crossover values (Dickason, Loudspeaker Design Cookbook)

export type CrossoverValues = {
  /** First order: C = 1/(2πfR), L = R/(2πf). */
  firstOrder: { capacitance: number; inductance: number };
  /** Second-order Linkwitz–Riley: C = 1/(4πfR), L = R/(πf). */
  linkwitzRiley2: { capacitance: number; inductance: number };
};

/**
 * The textbook capacitor (F) and inductor (H) values for a crossover at `f` hertz into a load of
 * `r` ohms, per Dickason, Loudspeaker Design Cookbook: 8 Ω at 3 kHz gives 6.631 µF / 0.4244 mH
 * (first order) and 3.316 µF / 0.8488 mH (2nd-order Linkwitz–Riley). Throws a RangeError for a
 * frequency or load that is not a number greater than zero.
 */
export function crossoverValues(f: number, r: number): CrossoverValues {
  if (!Number.isFinite(f) || f <= 0) {
    throw new RangeError(`The crossover frequency must be a number of hertz greater than zero (got ${String(f)}).`);
  }
  if (!Number.isFinite(r) || r <= 0) {
    throw new RangeError(`The load must be a number of ohms greater than zero (got ${String(r)}).`);
  }
  return {
    firstOrder: { capacitance: 1 / (2 * Math.PI * f * r), inductance: r / (2 * Math.PI * f) },
    linkwitzRiley2: { capacitance: 1 / (4 * Math.PI * f * r), inductance: r / (Math.PI * f) },
  };
}
