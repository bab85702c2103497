/** A model's speaker as scan fields: one slot per drive-unit position, then the crossover. */
import { PART_ORDER, PART_TYPE_WORD, type PartType } from "@/lib/vocabulary/part-types";
import { CROSSOVER_POSITION as XO_SLOT } from "@/lib/vocabulary/positions";
import { type Side } from "@/lib/vocabulary/sides";

/** One scan field of a speaker: a drive-unit position of the model, or the crossover. */
export interface Slot {
  /** The link position in the speaker: the model's position code ("T", "B1"), or "XO". */
  slot: string;
  kind: "drive_unit" | "crossover";
  partType: PartType | null;
  /** How a fitter names it: "tweeter", "bass unit at B2", "crossover". */
  label: string;
}

/**
 * The slots of a model's speaker, tweeter first, then midrange, bass, and the crossover last. A
 * position that takes more than one unit (count > 1; no model of the demo workshop has one) gets
 * one slot per unit, "B-1", "B-2", so every unit has a link position of its own.
 */
export function slotsOf(positions: { position: string; partType: PartType; count: number }[]): Slot[] {
  const sorted = [...positions].sort((a, b) => PART_ORDER[a.partType] - PART_ORDER[b.partType] || a.position.localeCompare(b.position, undefined, { numeric: true }));
  const codes = sorted.flatMap((p) => (p.count > 1 ? Array.from({ length: p.count }, (_, i) => ({ code: `${p.position}-${i + 1}`, partType: p.partType })) : [{ code: p.position, partType: p.partType }]));
  const perType = (t: PartType) => codes.filter((c) => c.partType === t).length;
  const slots: Slot[] = codes.map((c) => ({ slot: c.code, kind: "drive_unit", partType: c.partType, label: perType(c.partType) > 1 ? `${PART_TYPE_WORD[c.partType]} at ${c.code}` : PART_TYPE_WORD[c.partType] }));
  slots.push({ slot: XO_SLOT, kind: "crossover", partType: null, label: "crossover" });
  return slots;
}

export const slotKey = (side: Side, slot: string) => `${side}.${slot}`;
