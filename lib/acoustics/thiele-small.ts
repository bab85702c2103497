/**
 * Thiele–Small small-signal parameters of a drive unit: the textbook relations between them and a
 * check of a set typed into a form. SI units throughout unless a name says otherwise (Vas is kept
 * in litres on the form, as data sheets give it). Pure TypeScript, no dependencies.
 *
 *   Fs  = 1 / (2π·√(Mms·Cms))
 *   Qes = 2π·Fs·Mms·Re / Bl²
 *   Qms = 2π·Fs·Mms / Rms
 *   Qts = Qes·Qms / (Qes + Qms)
 *   Vas = ρ·c²·Sd²·Cms
 */

/** Density of air, kg/m³ (about 20 °C, sea level); pinned so results are reproducible. */
export const AIR_DENSITY = 1.204;
/** Speed of sound in air, m/s (about 20 °C); pinned with AIR_DENSITY. */
export const SPEED_OF_SOUND = 343.2;
/** A given Qts may differ from Qes·Qms/(Qes+Qms) by this fraction at most. */
export const QTS_TOLERANCE = 0.02;

function positive(name: string, v: number): void {
  if (typeof v !== "number" || !Number.isFinite(v) || v <= 0) throw new Error(`${name} must be a finite number above 0, got ${String(v)}`);
}

/** Total Q from the electrical and mechanical Q: Qes·Qms/(Qes+Qms). */
export function qtsFrom(qes: number, qms: number): number {
  positive("Qes", qes);
  positive("Qms", qms);
  return (qes * qms) / (qes + qms);
}

/** Free-air resonance, Hz, from the moving mass (kg) and the suspension compliance (m/N). */
export function fsFrom(mmsKg: number, cmsMPerN: number): number {
  positive("Mms", mmsKg);
  positive("Cms", cmsMPerN);
  return 1 / (2 * Math.PI * Math.sqrt(mmsKg * cmsMPerN));
}

/** Electrical Q from Fs (Hz), Mms (kg), the voice-coil DC resistance Re (Ω) and the force factor Bl (T·m). */
export function qesFrom(fs: number, mmsKg: number, re: number, bl: number): number {
  positive("Fs", fs);
  positive("Mms", mmsKg);
  positive("Re", re);
  positive("Bl", bl);
  return (2 * Math.PI * fs * mmsKg * re) / (bl * bl);
}

/** Mechanical Q from Fs (Hz), Mms (kg) and the mechanical resistance Rms (N·s/m). */
export function qmsFrom(fs: number, mmsKg: number, rms: number): number {
  positive("Fs", fs);
  positive("Mms", mmsKg);
  positive("Rms", rms);
  return (2 * Math.PI * fs * mmsKg) / rms;
}

/** Equivalent compliance volume, m³, from the effective piston area Sd (m²) and Cms (m/N): ρ·c²·Sd²·Cms. */
export function vasFrom(sdM2: number, cmsMPerN: number, rho: number = AIR_DENSITY, c: number = SPEED_OF_SOUND): number {
  positive("Sd", sdM2);
  positive("Cms", cmsMPerN);
  positive("Air density", rho);
  positive("Speed of sound", c);
  return rho * c * c * sdM2 * sdM2 * cmsMPerN;
}

/** Cubic metres to litres. */
export const m3ToLitres = (m3: number): number => m3 * 1000;
/** Litres to cubic metres. */
export const litresToM3 = (litres: number): number => litres / 1000;

export type TsField = "fs" | "qts" | "qes" | "qms" | "re" | "vas" | "sensitivity";

export interface TsFieldInfo {
  key: TsField;
  label: string;
  /** Unit to show beside the input; "" for a ratio. */
  unit: string;
  min: number;
  max: number;
  /** True when min itself is not allowed (Vas must be above 0). */
  minExclusive?: boolean;
  /** A sentence for the form, where one helps. */
  hint?: string;
}

/** The form's fields, in display order, with the ranges checkTsParams accepts (inclusive unless marked). */
export const TS_FIELDS: readonly TsFieldInfo[] = [
  { key: "fs", label: "Fs", unit: "Hz", min: 5, max: 40_000, hint: "Free-air resonance frequency" },
  { key: "qts", label: "Qts", unit: "", min: 0.05, max: 30, hint: "Total Q; left empty, it is worked out from Qes and Qms" },
  { key: "qes", label: "Qes", unit: "", min: 0.05, max: 30, hint: "Electrical Q" },
  { key: "qms", label: "Qms", unit: "", min: 0.05, max: 30, hint: "Mechanical Q" },
  { key: "re", label: "Re", unit: "Ω", min: 0.5, max: 100, hint: "DC resistance of the voice coil" },
  { key: "vas", label: "Vas", unit: "L", min: 0, max: 10_000, minExclusive: true, hint: "Equivalent compliance volume, litres" },
  {
    key: "sensitivity",
    label: "Sensitivity",
    unit: "dB SPL (2.83 V / 1 m)",
    min: 60,
    max: 120,
    hint: "On axis at 1 m with 2.83 V. 2.83 V is 1 W only into 8 Ω; into 4 Ω it is 2 W, 3 dB more than a 1 W figure (IEC 60268-5 rates sensitivity at 1 W)",
  },
];

export type TsInput = Partial<Record<TsField, number | null | undefined>>;
export type TsValues = Partial<Record<TsField, number>>;

export type TsCheckResult =
  | { ok: true; values: TsValues; derived: TsField[] }
  | { ok: false; fieldErrors: Partial<Record<TsField, string[]>> };

const sig4 = (v: number) => String(Number(v.toPrecision(4)));

/**
 * Checks a set of Thiele–Small parameters as typed into a form. Every field is optional (null or
 * undefined means not given); a given field must be a finite number inside its TS_FIELDS range.
 * When Qes and Qms are both given: a missing Qts is derived from them (and listed in `derived`);
 * a given Qts more than 2 % away from Qes·Qms/(Qes+Qms) is refused with the expected value. With
 * only one of them, a Qts not below it is refused (Qts is always below both Qes and Qms).
 * The errors are keyed by field, as lists of messages, to drop into a form state.
 */
export function checkTsParams(input: TsInput): TsCheckResult {
  const fieldErrors: Partial<Record<TsField, string[]>> = {};
  const values: TsValues = {};
  const add = (k: TsField, msg: string) => (fieldErrors[k] ??= []).push(msg);

  for (const f of TS_FIELDS) {
    const v = input?.[f.key];
    if (v === null || v === undefined) continue;
    const what = f.unit && f.key !== "sensitivity" ? `${f.label} (${f.unit})` : f.label;
    if (typeof v !== "number" || !Number.isFinite(v)) {
      add(f.key, `${what} must be a number`);
      continue;
    }
    const low = f.minExclusive ? v <= f.min : v < f.min;
    if (low || v > f.max) {
      const unit = f.key === "sensitivity" ? " dB" : f.unit ? ` ${f.unit}` : "";
      const range = f.minExclusive ? `above ${f.min}${unit} and at most ${f.max}${unit}` : `between ${f.min} and ${f.max}${unit}`;
      add(f.key, `${what} must be ${range}; ${v} looks mistyped`);
      continue;
    }
    values[f.key] = v;
  }

  const derived: TsField[] = [];
  const { qes, qms } = values;
  if (qes !== undefined && qms !== undefined) {
    const expected = qtsFrom(qes, qms);
    if (values.qts === undefined) {
      if (!fieldErrors.qts) {
        values.qts = expected;
        derived.push("qts");
      }
    } else if (Math.abs(values.qts - expected) > QTS_TOLERANCE * expected) {
      add(
        "qts",
        `Qts ${values.qts} does not agree with Qes and Qms: Qes·Qms/(Qes+Qms) = ${sig4(expected)}, and a Qts more than 2 % away from that is refused. Check Qts, Qes and Qms, or leave Qts empty to have it worked out`,
      );
    }
  } else if (values.qts !== undefined) {
    // With only one of Qes and Qms, Qts can still be checked: Qes·Qms/(Qes+Qms) is below both.
    const [key, other] = qes !== undefined ? (["qes", qes] as const) : qms !== undefined ? (["qms", qms] as const) : [null, 0];
    if (key && values.qts >= other) {
      add("qts", `Qts ${values.qts} must be below ${key === "qes" ? "Qes" : "Qms"} (${other}): the total Q is always smaller than either part`);
    }
  }

  if (Object.keys(fieldErrors).length > 0) return { ok: false, fieldErrors };
  return { ok: true, values, derived };
}

/**
 * A Thiele–Small value as the lab reads it, with the precision the measurement carries rather than
 * a fixed number of decimals (a house rule of the lab's pages): Fs to 0.1 Hz below 100 Hz and to
 * the hertz above (a bass unit's 37.5 Hz, a tweeter's 905 Hz); the Qs to three decimals below 1 and
 * two above (0.378, 2.99); Re to 0.01 Ω; Vas to three significant figures (30.1 L, 0.052 L); the
 * sensitivity to 0.1 dB. Without its unit: see `formatTsWithUnit`.
 */
export function formatTs(field: TsField, value: number): string {
  if (!Number.isFinite(value)) return String(value);
  switch (field) {
    case "fs":
      return value.toFixed(Math.abs(value) < 100 ? 1 : 0);
    case "qts":
    case "qes":
    case "qms":
      return value.toFixed(Math.abs(value) < 1 ? 3 : 2);
    case "re":
      return value.toFixed(2);
    case "vas":
      return String(Number(value.toPrecision(3)));
    case "sensitivity":
      return value.toFixed(1);
  }
}

/** The same with its unit where it has one: "37.5 Hz" (Fs), "0.378" (Qts), "6.02 Ω" (Re), "30.1 L" (Vas), "88.5 dB". */
export function formatTsWithUnit(field: TsField, value: number): string {
  const info = TS_FIELDS.find((f) => f.key === field)!;
  const unit = field === "sensitivity" ? "dB" : info.unit;
  return `${formatTs(field, value)}${unit ? ` ${unit}` : ""}`;
}
