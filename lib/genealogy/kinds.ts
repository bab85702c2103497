/** How each kind of item is named on screen. */
export const KIND_LABEL: Record<string, string> = {
  flitch: "Flitch",
  leaf: "Veneer leaf",
  cabinet: "Cabinet",
  drive_unit: "Drive unit",
  crossover: "Crossover",
  component_lot: "Component lot",
  speaker: "Speaker",
  pair: "Pair",
  carton: "Carton",
  shipment: "Shipment",
};

/** An item's page. */
export const itemHref = (identity: string) => `/register/items/${encodeURIComponent(identity)}`;

/** A state as people read it: "in_assembly" → "in assembly". */
export const stateLabel = (state: string) => state.replace(/_/g, " ");
