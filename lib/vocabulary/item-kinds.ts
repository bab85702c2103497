/** Every kind of thing the register follows. Serialised kinds carry a MOD 37-2 checked serial. */
export const ITEM_KINDS = [
  "flitch", "leaf", "cabinet", "drive_unit", "crossover", "component_lot", "unit_batch", "maker_lot", "speaker", "pair", "carton", "shipment",
  "trim_part", "supplier_lot",
] as const;
export type ItemKind = (typeof ITEM_KINDS)[number];

/**
 * Kinds that name a source rather than one physical part: they sit in many parents at once. A lot
 * sits in each crossover made from it, a drive-unit batch in each of its units, a maker's lot in
 * each batch that came from it, and a flitch in each of its leaves, so the forward trace of any of
 * them reaches every speaker and pair that holds a part of it. A supplier's lot of trim parts
 * (machined housings, plinths, bezels) sits in each trim part that came in it.
 */
export const SHARED_KINDS: readonly ItemKind[] = ["component_lot", "unit_batch", "maker_lot", "flitch", "supplier_lot"];

/** A kind as a heading or table cell: "Drive unit". */
export const KIND_LABEL: Record<ItemKind, string> = {
  flitch: "Flitch",
  leaf: "Veneer leaf",
  cabinet: "Cabinet",
  drive_unit: "Drive unit",
  crossover: "Crossover",
  component_lot: "Component lot",
  unit_batch: "Drive-unit batch",
  maker_lot: "Maker's lot",
  speaker: "Speaker",
  pair: "Pair",
  carton: "Carton",
  shipment: "Shipment",
  trim_part: "Trim part",
  supplier_lot: "Supplier lot",
};

/** A kind inside a sentence: "a crossover board". */
export const KIND_WORD: Record<ItemKind, string> = {
  flitch: "flitch",
  leaf: "veneer leaf",
  cabinet: "cabinet",
  drive_unit: "drive unit",
  crossover: "crossover board",
  component_lot: "component lot",
  unit_batch: "drive-unit batch",
  maker_lot: "maker's lot",
  speaker: "speaker",
  pair: "pair",
  carton: "carton",
  shipment: "shipment",
  trim_part: "trim part",
  supplier_lot: "supplier's lot",
};

export const isItemKind = (v: string): v is ItemKind => (ITEM_KINDS as readonly string[]).includes(v);

/** A kind's label; a kind recorded before this list existed shows as it is. */
export const kindLabel = (kind: string): string => (isItemKind(kind) ? KIND_LABEL[kind] : kind);

/** A state as people read it: "in_assembly" → "in assembly". */
export const stateLabel = (state: string) => state.replace(/_/g, " ");
