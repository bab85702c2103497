/** A model's speaker as scan fields: one slot per drive-unit position, the crossover, then its trim parts. */
import { PART_ORDER, PART_TYPE_WORD, type PartType } from "@/lib/vocabulary/part-types";
import { CROSSOVER_POSITION as XO_SLOT } from "@/lib/vocabulary/positions";
import { type Side } from "@/lib/vocabulary/sides";

/** One scan field of a speaker: a drive-unit position of the model, the crossover, or a trim position. */
export interface Slot {
  /** The link position in the speaker: the model's position code ("T", "B1", "TOP", "PLN-2"), or "XO". */
  slot: string;
  kind: "drive_unit" | "crossover" | "trim";
  partType: PartType | null;
  /** For a trim slot: the model's trim position code the part must have been received for ("TOP"). */
  trimPosition?: string;
  /** How a fitter names it: "tweeter", "bass unit at B2", "crossover", "top housing". */
  label: string;
}

/**
 * The slots of a model's speaker, tweeter first, then midrange, bass, and the crossover last. A
 * position that takes more than one unit (count > 1; no model of the demo workshop has one) gets
 * one slot per unit, "B-1", "B-2", so every unit has a link position of its own.
 */
export function slotsOf(positions: { position: string; partType: PartType; count: number }[], trim: { position: string; label: string; count: number }[] = []): Slot[] {
  const sorted = [...positions].sort((a, b) => PART_ORDER[a.partType] - PART_ORDER[b.partType] || a.position.localeCompare(b.position, undefined, { numeric: true }));
  const codes = sorted.flatMap((p) => (p.count > 1 ? Array.from({ length: p.count }, (_, i) => ({ code: `${p.position}-${i + 1}`, partType: p.partType })) : [{ code: p.position, partType: p.partType }]));
  const perType = (t: PartType) => codes.filter((c) => c.partType === t).length;
  const slots: Slot[] = codes.map((c) => ({ slot: c.code, kind: "drive_unit", partType: c.partType, label: perType(c.partType) > 1 ? `${PART_TYPE_WORD[c.partType]} at ${c.code}` : PART_TYPE_WORD[c.partType] }));
  slots.push({ slot: XO_SLOT, kind: "crossover", partType: null, label: "crossover" });
  // Trim parts after the crossover, by position code; a position of count n gets n slots "TOP-1"….
  for (const t of [...trim].sort((a, b) => a.position.localeCompare(b.position))) {
    const label = t.label.charAt(0).toLowerCase() + t.label.slice(1);
    if (t.count <= 1) slots.push({ slot: t.position, kind: "trim", partType: null, trimPosition: t.position, label });
    else for (let i = 1; i <= t.count; i++) slots.push({ slot: `${t.position}-${i}`, kind: "trim", partType: null, trimPosition: t.position, label: `${label} ${i}` });
  }
  return slots;
}

export const slotKey = (side: Side, slot: string) => `${side}.${slot}`;
