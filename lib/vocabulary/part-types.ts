/** The kinds of drive unit a speaker holds. */
export const PART_TYPES = ["tweeter", "midrange", "bass"] as const;
export type PartType = (typeof PART_TYPES)[number];

export const isPartType = (v: unknown): v is PartType => typeof v === "string" && (PART_TYPES as readonly string[]).includes(v);

/** "Tweeter", for headings and table cells. */
export const PART_TYPE_LABEL: Record<PartType, string> = { tweeter: "Tweeter", midrange: "Midrange", bass: "Bass" };

/** "bass unit", inside a sentence. */
export const PART_TYPE_WORD: Record<PartType, string> = { tweeter: "tweeter", midrange: "midrange unit", bass: "bass unit" };

/** The order a speaker's parts are listed in: from the top of the baffle down, the crossover last. */
export const PART_ORDER: Record<PartType, number> = { tweeter: 0, midrange: 1, bass: 2 };

/** A drive unit's part type inside a sentence; "drive unit" when it is not known. */
export const partWord = (t: string | null | undefined): string => (isPartType(t) ? PART_TYPE_WORD[t] : "drive unit");
