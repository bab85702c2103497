import type { Side } from "./sides";

/**
 * Link positions: where a part sits in what holds it. A pair holds its two cabinets until assembly,
 * then its two speakers; a speaker holds its cabinet, its drive units at the model's position codes
 * ("T", "M", "B"), and its crossover board; a cabinet holds its face leaves at F1…Fk.
 */
export const PAIR_CABINET_POSITION = { L: "CAB-L", R: "CAB-R" } as const satisfies Record<Side, string>;
export const PAIR_SPEAKER_POSITION = { L: "L", R: "R" } as const satisfies Record<Side, string>;
export const SPEAKER_CABINET_POSITION = "CAB";
export const CROSSOVER_POSITION = "XO";

/** Where a source sits in what was made from it: a unit's batch, a batch's maker lot, a leaf's flitch. */
export const BATCH_POSITION = "BATCH";
export const MAKER_LOT_POSITION = "LOT";
export const FLITCH_POSITION = "FLITCH";
/** Where a supplier's lot sits in each trim part that came in it. */
export const SUPPLIER_LOT_POSITION = "SLOT";

/** The face position of a cabinet's i-th leaf (0-based): F1, F2… */
export const facePosition = (i: number) => `F${i + 1}`;

/** The side a pair's cabinet position stands for. */
export const sideOfCabinetPosition = (position: string): Side | null => (position === "CAB-L" ? "L" : position === "CAB-R" ? "R" : null);

const POSITION_LETTER: Record<string, string> = { T: "tweeter", M: "midrange", B: "bass" };

/**
 * A speaker's position code as people read it: "T" → "tweeter (T)", "B2" → "bass 2 (B2)",
 * "XO" → "crossover (XO)". Codes come from the model; an unknown code is shown as it is.
 */
export function positionName(code: string): string {
  if (code === CROSSOVER_POSITION) return "crossover (XO)";
  if (code === SPEAKER_CABINET_POSITION) return "cabinet (CAB)";
  if (code === BATCH_POSITION) return "batch";
  if (code === MAKER_LOT_POSITION) return "maker's lot";
  if (code === FLITCH_POSITION) return "flitch";
  if (code === SUPPLIER_LOT_POSITION) return "supplier's lot";
  const m = /^([TMB])(?:-?(\d+))?$/.exec(code);
  if (!m) return code;
  return `${POSITION_LETTER[m[1]!]}${m[2] ? ` ${m[2]}` : ""} (${code})`;
}
