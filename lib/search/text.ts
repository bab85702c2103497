/**
 * How the search index stores text and how a query is made to meet it. The search_index migration's triggers
 * remove the same characters in SQL (nested replace()): change both together.
 *
 * Separators are dropped rather than kept because people and scanners disagree about them: a lot
 * printed "LOT-CAP-2506-A" is typed "cap 2506" or "CAP2506", and a serial loses its hyphens in some
 * scanners. Case and accents are folded by the trigram tokenizer (remove_diacritics 1).
 */
export const SEPARATORS = /[ \-./_@,']/g;

export const compactText = (text: string): string => text.replace(SEPARATORS, "");

/** The trigram tokenizer matches nothing shorter than three characters. */
export const MIN_FRAGMENT = 3;

/** A query as one FTS5 phrase: double quotes inside are doubled, so any text is a valid query. */
export const phrase = (text: string): string => `"${text.replace(/"/g, '""')}"`;

/**
 * Pieces of a query with one slip in it (a letter wrong, missing, doubled, or two swapped), each
 * as a phrase, for the typo fallback to OR: its halves and its thirds, so at least one piece
 * comes through whole wherever the slip is. Pieces are at least three characters (the trigram
 * tokenizer's least); a query too short for halves gives its trigrams instead.
 */
export function typoPieces(text: string): string[] {
  const chars = [...text.toLowerCase()];
  if (chars.length < 2 * MIN_FRAGMENT) return trigrams(text);
  const cut = (n: number) => Array.from({ length: n }, (_, i) => chars.slice(Math.round((i * chars.length) / n), Math.round(((i + 1) * chars.length) / n)).join(""));
  const pieces = [...cut(2), ...(chars.length >= 3 * MIN_FRAGMENT ? cut(3) : [])];
  return [...new Set(pieces)].map(phrase);
}

/** The query's distinct trigrams, lower case, each as a phrase. */
export function trigrams(text: string): string[] {
  const chars = [...text.toLowerCase()];
  const out = new Set<string>();
  for (let i = 0; i + 3 <= chars.length; i++) out.add(chars.slice(i, i + 3).join(""));
  return [...out].map(phrase);
}
