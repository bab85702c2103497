/**
 * Frequencies, bands and levels written the way the lab says them, always with their unit:
 * "1.6 kHz", "31.5 Hz", "0.24 dB". One place for it, so a band reads the same on a chart's axis,
 * in a tooltip, in a plan's table, in a message and on the final test. Pure: browser and server.
 */
import { nominalBandName } from "./bands";

/** The most significant figures a frequency is shown with: 1258.93 Hz → "1.26 kHz". */
const HZ_DIGITS = 3;

const plain = (x: number, digits: number) => String(Number(x.toPrecision(digits)));

/**
 * A frequency with its unit, in hertz below 1 kHz and in kilohertz from it, to three significant
 * figures: 20 → "20 Hz", 31.5 → "31.5 Hz", 1000 → "1 kHz", 1600 → "1.6 kHz", 1258.93 → "1.26 kHz",
 * 12500 → "12.5 kHz". A value that rounds up to 1000 Hz is written "1 kHz".
 */
export function formatHz(hz: number, digits = HZ_DIGITS): string {
  if (!Number.isFinite(hz)) return `${String(hz)} Hz`;
  const rounded = Number(hz.toPrecision(digits));
  if (Math.abs(rounded) >= 1e6) return `${plain(rounded / 1e6, digits)} MHz`;
  if (Math.abs(rounded) >= 1000) return `${plain(rounded / 1000, digits)} kHz`;
  return `${plain(rounded, digits)} Hz`;
}

/**
 * A one-third-octave band by its ISO 266 nominal name (as `ThirdOctaveBand.nominal` gives it),
 * with its unit: "1.6k" → "1.6 kHz", "31.5" → "31.5 Hz", "3.15k" → "3.15 kHz", "1M" → "1 MHz".
 * A name that is not of that form is returned with " Hz" after it.
 */
export function bandLabel(nominal: string): string {
  const m = /^(\d+(?:\.\d+)?)([kM]?)$/.exec(nominal.trim());
  if (!m) return `${nominal} Hz`;
  return `${m[1]} ${m[2] ?? ""}Hz`;
}

/** The band of index x (0 at 1 kHz) with its unit: bandLabelOf(2) → "1.6 kHz". */
export const bandLabelOf = (x: number): string => bandLabel(nominalBandName(x));

/**
 * A range of frequencies, the unit said once where both ends share it: "1.6–20 kHz",
 * "200 Hz–5 kHz", "31.5 Hz–1 kHz", "100–500 Hz".
 */
export function formatHzRange(minHz: number, maxHz: number): string {
  const lo = formatHz(minHz);
  const hi = formatHz(maxHz);
  const [loValue, loUnit] = lo.split(" ");
  const [, hiUnit] = hi.split(" ");
  return loUnit === hiUnit ? `${loValue}–${hi}` : `${lo}–${hi}`;
}

/** A level difference with its unit, two decimals by default: 0.2449 → "0.24 dB". */
export function formatDb(db: number, decimals = 2): string {
  return `${db.toFixed(decimals)} dB`;
}

/**
 * A limit in dB as it was set, with at least one decimal and no more than it needs (up to three):
 * 1 → "1.0 dB", 0.5 → "0.5 dB", 0.25 → "0.25 dB".
 */
export function formatLimitDb(db: number): string {
  const s = String(Number(db.toFixed(3)));
  return `${s.includes(".") ? s : `${s}.0`} dB`;
}
