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

/** The query's distinct trigrams, lower case, each as a phrase: the typo fallback ORs them. */
export function trigrams(text: string): string[] {
  const chars = [...text.toLowerCase()];
  const out = new Set<string>();
  for (let i = 0; i + 3 <= chars.length; i++) out.add(chars.slice(i, i + 3).join(""));
  return [...out].map(phrase);
}
