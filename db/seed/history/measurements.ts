/**
 * The invented measurements of the demo workshop: drive-unit responses and Thiele–Small sets,
 * crossover boards with their part readings and responses, finished-pair responses. Shapes are the
 * textbook ones (second-order high-pass roll-off, a soft top), each unit with its own small,
 * smooth deviations; a few units are off enough that no partner is within the limit and they stay
 * in stock. Demo data only: no check of the computation relies on it.
 */
import { compareResponses } from "@/lib/acoustics";
import { formatValue, type Unit } from "@/lib/crossover-parts";
import type { BoardPartInput } from "@/lib/lab/crossovers";
import type { TsInput } from "@/lib/lab/units";
import type { PartType } from "@/lib/vocabulary/part-types";
import { round, type Rng } from "./basics";
import type { RefModel } from "./reference";

type Points = number[][];

/** Frequencies from `lo` to `hi` Hz, `perOctave` to the octave. */
function sweep(lo: number, hi: number, perOctave: number): number[] {
  const out: number[] = [];
  for (let k = 0; ; k++) {
    const f = lo * 2 ** (k / perOctave);
    if (f > hi * (1 + 1e-9)) break;
    out.push(f);
  }
  return out;
}

/** Second-order high-pass at `fc` with quality `q`, in dB. */
const highPass = (f: number, fc: number, q: number) => {
  const r = f / fc;
  return 20 * Math.log10((r * r) / Math.sqrt((1 - r * r) ** 2 + (r / q) ** 2));
};
const softTop = (f: number, corner: number) => -10 * Math.log10(1 + (f / corner) ** 4);

/** A unit's own departure from its type: level, a slightly moved roll-off, and gentle ripples. */
interface Own {
  offset: number;
  fcScale: number;
  ripple: { a: number; p: number }[];
}

function own(rng: Rng, spread: { offset: number; fc: number; ripple: number }, outlierChance = 0): Own {
  const outlier = rng.chance(outlierChance);
  const offset = outlier ? (rng.chance(0.5) ? 1 : -1) * (0.8 + 0.3 * rng.float()) : spread.offset * rng.gauss();
  return { offset, fcScale: 1 + spread.fc * rng.gauss(), ripple: [1, 2, 3].map(() => ({ a: spread.ripple * rng.gauss(), p: rng.float() * 2 * Math.PI })) };
}

const rippleAt = (o: Own, f: number) => o.ripple.reduce((sum, r, i) => sum + r.a * Math.sin((i + 1) * 1.3 * Math.log2(f / 500) + r.p), 0);

const UNIT_SHAPES: Record<PartType, { lo: number; hi: number; level: number; fc: number; q: number; top: number }> = {
  tweeter: { lo: 500, hi: 20500, level: 90, fc: 1000, q: 0.8, top: 28000 },
  midrange: { lo: 80, hi: 12000, level: 86.5, fc: 110, q: 0.75, top: 6500 },
  bass: { lo: 16, hi: 2500, level: 87, fc: 38, q: 0.7, top: 1500 },
};

export interface UnitMeasurement {
  points: Points;
  ts: TsInput;
}

/** One drive unit on the bench: its response (1/24 octave) and its Thiele–Small parameters. */
export function unitMeasurement(rng: Rng, partType: PartType): UnitMeasurement {
  const s = UNIT_SHAPES[partType];
  const o = own(rng, { offset: 0.06, fc: 0.008, ripple: 0.04 }, 0.06);
  const points = sweep(s.lo, s.hi, 24).map((f) => [round(f, 2), round(s.level + o.offset + highPass(f, s.fc * o.fcScale, s.q) + softTop(f, s.top) + rippleAt(o, f), 3)]);
  const g = (base: number, sd: number) => base * (1 + sd * rng.gauss());
  const ts: TsInput =
    partType === "tweeter"
      ? { fsHz: round(g(900 * o.fcScale, 0.02), 0), qes: round(g(1.1, 0.04), 3), qms: round(g(2.2, 0.05), 3), qts: null, reOhm: round(g(4.7, 0.01), 2), vasL: null, sensitivityDb: round(s.level + o.offset, 1) }
      : partType === "midrange"
        ? { fsHz: round(g(68 * o.fcScale, 0.03), 1), qes: round(g(0.42, 0.04), 3), qms: round(g(3.4, 0.05), 3), qts: null, reOhm: round(g(5.6, 0.01), 2), vasL: round(g(3.8, 0.06), 2), sensitivityDb: round(s.level + o.offset, 1) }
        : { fsHz: round(g(36 * o.fcScale, 0.03), 1), qes: round(g(0.36, 0.04), 3), qms: round(g(3.1, 0.05), 3), qts: null, reOhm: round(g(5.8, 0.01), 2), vasL: round(g(31, 0.06), 1), sensitivityDb: round(s.level + o.offset, 1) };
  return { points, ts };
}

/** A response file as the bench writes it: a title line naming the serial, a header, one point a line. */
export function responseFile(title: string, points: Points): string {
  return [`# ${title}`, "Hz dB", ...points.map(([hz, db]) => `${hz!.toFixed(2)} ${db!.toFixed(3)}`), ""].join("\n");
}

// ---- crossover boards -----------------------------------------------------------------------------

type ComponentType = "capacitor" | "inductor" | "resistor";

/** The values the workshop buys in lots, one lot per value and quarter; part numbers are invented. */
export const LOT_VALUES: { type: ComponentType; letter: string; nominal: number; unit: Unit; partNumber: string }[] = [
  { type: "capacitor", letter: "A", nominal: 4.7e-6, unit: "F", partNumber: "PPF-4U7-400" },
  { type: "capacitor", letter: "B", nominal: 10e-6, unit: "F", partNumber: "PPF-10U-250" },
  { type: "capacitor", letter: "C", nominal: 22e-6, unit: "F", partNumber: "PPF-22U-100" },
  { type: "inductor", letter: "A", nominal: 0.33e-3, unit: "H", partNumber: "ACL-0M33-045" },
  { type: "inductor", letter: "B", nominal: 1.5e-3, unit: "H", partNumber: "ACL-1M5-060" },
  { type: "inductor", letter: "C", nominal: 2.7e-3, unit: "H", partNumber: "FCL-2M7-035" },
  { type: "inductor", letter: "D", nominal: 4.7e-3, unit: "H", partNumber: "FCL-4M7-040" },
  { type: "resistor", letter: "A", nominal: 2.2, unit: "Ω", partNumber: "WWR-2R2-10" },
  { type: "resistor", letter: "B", nominal: 3.3, unit: "Ω", partNumber: "WWR-3R3-10" },
  { type: "resistor", letter: "C", nominal: 6.8, unit: "Ω", partNumber: "WWR-6R8-10" },
];
export const COMPONENT_CODES: Record<ComponentType, string> = { capacitor: "CAP", inductor: "IND", resistor: "RES" };

/**
 * The lot value at each reference designator of a model's board. The 4.7 µF tweeter capacitor is
 * common to all three, so one lot of it ends up in every board of its quarter.
 */
const BOARD_PARTS: Record<string, [position: string, type: ComponentType, letter: string][]> = {
  PW2: [["C1", "capacitor", "A"], ["C2", "capacitor", "B"], ["L1", "inductor", "A"], ["L2", "inductor", "B"], ["R1", "resistor", "A"], ["R2", "resistor", "C"]],
  SL3: [["C1", "capacitor", "A"], ["C2", "capacitor", "C"], ["L1", "inductor", "A"], ["L2", "inductor", "C"], ["R1", "resistor", "A"], ["R2", "resistor", "B"]],
  TB3: [["C1", "capacitor", "A"], ["C2", "capacitor", "C"], ["L1", "inductor", "A"], ["L2", "inductor", "D"], ["R1", "resistor", "A"], ["R2", "resistor", "B"]],
};

/**
 * A board's parts as the lab types them: the lot of each, its nominal, tolerance J (±5 %) and the
 * reading, within 3 % of the nominal; `failing` puts C2 7.8 % under its nominal, so the board fails.
 */
export function boardParts(rng: Rng, modelCode: string, lotCode: (type: ComponentType, letter: string) => string, failing = false): BoardPartInput[] {
  return (BOARD_PARTS[modelCode] ?? BOARD_PARTS.PW2!).map(([position, type, letter]) => {
    const v = LOT_VALUES.find((l) => l.type === type && l.letter === letter)!;
    const off = failing && position === "C2" ? -0.078 : Math.max(-0.03, Math.min(0.03, 0.012 * rng.gauss()));
    return { position, lot: lotCode(type, letter), partNumber: v.partNumber, nominal: formatValue(v.nominal, v.unit), tolerance: "J", reading: formatValue(v.nominal * (1 + off), v.unit, 5) };
  });
}

/** A board's response over its model's range (1/12 octave), measured into the bench's dummy load. */
export function boardResponse(rng: Rng, model: RefModel): Points {
  const o = own(rng, { offset: 0.04, fc: 0, ripple: 0.03 });
  return sweep(model.responseMinHz, model.responseMaxHz, 12).map((f) => {
    const base = -3 + 0.6 * Math.sin(1.1 * Math.log2(f / 1000)) - 1.2 / (1 + (f / (1.5 * model.responseMinHz)) ** 2);
    return [round(f, 2), round(base + o.offset + rippleAt(o, f), 3)];
  });
}

// ---- the finished pair ------------------------------------------------------------------------------

const toPoints = (pts: Points) => pts.map(([hz, db]) => ({ hz: hz!, db: db! }));

/**
 * Both finished speakers over the model's range, 1/12 octave: a shared voicing plus each
 * speaker's own small, smooth deviation. A passing pair stays within 0.8 of the model's limit (a
 * draw over it is brought closer); `failing` lifts the right tweeter 1.35 dB above about 2.5 kHz.
 */
export function finalResponses(rng: Rng, model: RefModel, failing = false): { L: Points; R: Points } {
  const level = 86 + 1.5 * rng.gauss();
  const voicing = [0.5 * rng.gauss(), 0.35 * rng.gauss(), 0.25 * rng.gauss()];
  const phase = [rng.float() * 6.3, rng.float() * 6.3, rng.float() * 6.3];
  const mine = [0, 1].map(() => ({ a: [0.07 * rng.gauss(), 0.06 * rng.gauss(), 0.05 * rng.gauss()], p: [rng.float() * 6.3, rng.float() * 6.3, rng.float() * 6.3], offset: 0.08 * rng.gauss() }));
  const hz = sweep(model.responseMinHz, model.responseMaxHz, 12);
  if (hz[hz.length - 1]! < model.responseMaxHz * 0.999) hz.push(model.responseMaxHz);
  const curve = (side: 0 | 1, scale: number) =>
    hz.map((f) => {
      const x = Math.log2(f / 1000);
      const base = level + voicing.reduce((sum, a, i) => sum + a * Math.sin((i + 1) * 0.9 * x + phase[i]!), 0) - 4 / (1 + (f / (1.3 * model.responseMinHz)) ** 4) - 1.2 * (f / model.responseMaxHz) ** 2;
      const o = mine[side]!;
      const dev = o.offset + o.a.reduce((sum, a, i) => sum + a * Math.sin((i + 1) * 1.4 * x + o.p[i]!), 0);
      const lifted = failing && side === 1 ? 1.35 / (1 + (2500 / f) ** 4) : 0;
      return [round(f, 2), round(base + scale * dev + lifted, 3)];
    });
  const opts = { minHz: model.responseMinHz, maxHz: model.responseMaxHz, limitDb: model.pairResponseLimitDb };
  for (let scale = 1; ; scale /= 2) {
    const out = { L: curve(0, scale), R: curve(1, scale) };
    if (failing || compareResponses(toPoints(out.L), toPoints(out.R), opts).maxAbsDiffDb <= 0.8 * model.pairResponseLimitDb || scale < 1e-3) return out;
  }
}
