/**
 * Where the units of a batch stand, in classes that do not overlap and leave nothing out, so a
 * batch's columns always add up to its units. Pure: the lab's home page and the batch page count
 * with the same rule.
 */

export const UNIT_CLASSES = ["waiting", "free", "reserved", "fitted", "failed", "other"] as const;
export type UnitClass = (typeof UNIT_CLASSES)[number];

/** Each class as a column heading and inside a sentence. */
export const UNIT_CLASS_WORDS: Record<UnitClass, { column: string; sentence: string }> = {
  waiting: { column: "Waiting", sentence: "waiting for measurement" },
  free: { column: "Measured", sentence: "measured and free to match" },
  reserved: { column: "Reserved", sentence: "reserved in sets" },
  fitted: { column: "Fitted", sentence: "fitted in speakers" },
  failed: { column: "Failed", sentence: "failed" },
  other: { column: "Other", sentence: "elsewhere (scrapped, returned or held)" },
};

/**
 * The class of a unit from its state and whether an open matched set holds it. "Free" is what
 * matching may pair: measured (or back in stock) and in no set. Anything the lab does not follow
 * here (scrapped, say) is "other", never dropped.
 */
export function unitClass(state: string, inOpenSet: boolean): UnitClass {
  if (state === "awaiting_measurement") return "waiting";
  if (state === "reserved" || inOpenSet) return "reserved";
  if (state === "measured" || state === "in_stock") return "free";
  if (state === "fitted") return "fitted";
  if (state === "failed") return "failed";
  return "other";
}

export type UnitCounts = Record<UnitClass, number> & { units: number };

/** Counts of units by class, from (state, in a set, how many) groups. */
export function countUnits(groups: { state: string; inOpenSet: boolean; n: number }[]): UnitCounts {
  const counts = Object.fromEntries(UNIT_CLASSES.map((c) => [c, 0])) as Record<UnitClass, number>;
  let units = 0;
  for (const g of groups) {
    counts[unitClass(g.state, g.inOpenSet)] += g.n;
    units += g.n;
  }
  return { ...counts, units };
}
