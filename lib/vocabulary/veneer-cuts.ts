/**
 * How a veneer's leaves are cut from the log (common practice: the trade's usual names; the
 * Architectural Woodwork Standards describe the same cuts). Empty when not recorded.
 */
export const VENEER_CUTS = ["crown", "quarter", "rift", "rotary"] as const;
export type VeneerCut = (typeof VENEER_CUTS)[number];

export const VENEER_CUT_WORDS: Record<VeneerCut, string> = {
  crown: "crown cut",
  quarter: "quarter cut",
  rift: "rift cut",
  rotary: "rotary cut",
};

export const isVeneerCut = (v: unknown): v is VeneerCut => typeof v === "string" && (VENEER_CUTS as readonly string[]).includes(v);

/** "crown cut", or "" for a cut not recorded. */
export const cutWords = (cut: string): string => (isVeneerCut(cut) ? VENEER_CUT_WORDS[cut] : "");
