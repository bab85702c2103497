/**
 * How many units a new batch holds: the number typed, or one per maker's serial scanned. Pure, so
 * the batch form counts the serials the same way as the server that registers them.
 */

/** Makers' serials as scanned: one a line, or separated by spaces, commas or semicolons. */
export const splitMakerSerials = (text: string): string[] =>
  text
    .split(/[\s,;]+/)
    .map((s) => s.trim())
    .filter(Boolean);

/**
 * Why a typed number of units and the serials scanned disagree, or null when they agree or only
 * one of them is given (0 means not given). Numbers that do not add up are a slip somewhere, so
 * they are refused rather than one of them trusted.
 */
export function batchCountMismatch(count: number, serials: number): string | null {
  if (count === 0 || serials === 0 || count === serials) return null;
  return `The number of units is ${count}, but ${serials} makers' serial${serials === 1 ? " is" : "s are"} scanned. Leave the number empty to register one unit per serial, or check the list.`;
}
