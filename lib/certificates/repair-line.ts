import { formatLongDate } from "@/lib/format";

/** What a repair replaced, as far as the owner's line needs it. */
export interface RepairPart {
  side: "L" | "R";
  /** tweeter | midrange | bass | crossover */
  part: string;
}

const PART_ORDER = ["tweeter", "midrange", "bass", "crossover"];
/** The part in words an owner reads: "bass" alone is not a thing you replace. */
const PART_WORDS: Record<string, [one: string, many: string]> = {
  tweeter: ["tweeter", "tweeters"],
  midrange: ["midrange unit", "midrange units"],
  bass: ["bass unit", "bass units"],
  crossover: ["crossover", "crossovers"],
};
const COUNT_WORDS = ["", "", "two", "three", "four", "five", "six"];

const partWords = (part: string, n: number) => {
  const [one, many] = PART_WORDS[part] ?? [part, `${part}s`];
  return n === 1 ? one : `${COUNT_WORDS[n] ?? String(n)} ${many}`;
};

const joinAnd = (xs: string[]) => (xs.length <= 1 ? (xs[0] ?? "") : `${xs.slice(0, -1).join(", ")} and ${xs.at(-1)}`);

/**
 * The short line the owner reads on the public check and the revised certificate, e.g. "Right
 * speaker's tweeter replaced on 4 December 2026 after a service visit". No serials, no case, no
 * names: only which speaker, which part and the day (in the workshop's time zone).
 */
export function repairLine(parts: RepairPart[], on: Date): string {
  const date = formatLongDate(on);
  if (parts.length === 0) return `Checked and tested again on ${date} after a service visit, with no part replaced`;
  const count = (side: "L" | "R", part: string) => parts.filter((p) => p.side === side && p.part === part).length;
  const rank = (part: string) => (PART_ORDER.includes(part) ? PART_ORDER.indexOf(part) : PART_ORDER.length);
  const kinds = [...new Set(parts.map((p) => p.part))].sort((a, b) => rank(a) - rank(b) || a.localeCompare(b));
  const both: string[] = [];
  const bySide: Record<"L" | "R", string[]> = { L: [], R: [] };
  for (const part of kinds) {
    const [l, r] = [count("L", part), count("R", part)];
    // The same on both sides reads as "both speakers' tweeters".
    if (l > 0 && l === r) both.push(l === 1 ? (PART_WORDS[part]?.[1] ?? `${part}s`) : partWords(part, l));
    else {
      if (l) bySide.L.push(partWords(part, l));
      if (r) bySide.R.push(partWords(part, r));
    }
  }
  const clauses = [
    ...(both.length ? [`both speakers' ${joinAnd(both)}`] : []),
    ...(bySide.L.length ? [`left speaker's ${joinAnd(bySide.L)}`] : []),
    ...(bySide.R.length ? [`right speaker's ${joinAnd(bySide.R)}`] : []),
  ];
  const text = `${joinAnd(clauses)} replaced on ${date} after a service visit`;
  return text.charAt(0).toUpperCase() + text.slice(1);
}
