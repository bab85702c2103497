/** The two sides of a stereo pair, as the listener sees them. */
export const SIDES = ["L", "R"] as const;
export type Side = (typeof SIDES)[number];

export const SIDE_WORD: Record<Side, string> = { L: "left", R: "right" };

/** "left" or "right". */
export const sideWord = (side: Side): string => SIDE_WORD[side];
/** "Left speaker" / "Right speaker", to start a line. */
export const SPEAKER_AT: Record<Side, string> = { L: "Left speaker", R: "Right speaker" };

export const isSide = (v: unknown): v is Side => v === "L" || v === "R";
