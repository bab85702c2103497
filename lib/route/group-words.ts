/**
 * Words for a routed group (lib/route/routed-group.ts), pure so the pages may import them too.
 * The route rules speak of sides and cabinets ("the left cabinet", "The pair is on hold"); a group
 * of one (a lone lacquer cabinet, a trim part) has one member recorded as side "L", so its words
 * are put right here rather than in every rule.
 */
import { cabinetsPhrase } from "./rules";
import type { Side } from "./types";

export type RoutedKind = "pair" | "lone_cabinet" | "trim_part";

/** What the group is called in a sentence: "the pair", "the cabinet", "the trim part". */
export const HOLDER_WORD: Record<RoutedKind, string> = { pair: "the pair", lone_cabinet: "the cabinet", trim_part: "the trim part" };

/** What a step was done on: "the left and right cabinets", or "the trim part". */
export function membersPhrase(kind: RoutedKind, sides: Side[]): string {
  return kind === "pair" ? cabinetsPhrase(sides) : HOLDER_WORD[kind];
}

const capital = (s: string) => s[0]!.toUpperCase() + s.slice(1);

/** A rule's sentence in the group's own words: a group of one has no "left cabinet". */
export function groupWords(kind: RoutedKind, text: string): string {
  if (kind === "pair") return text;
  const holder = HOLDER_WORD[kind];
  return text
    .replace(/the left cabinet/g, holder)
    .replace(/The pair is on hold/g, `${capital(holder)} is on hold`)
    .replace(/Choose the cabinet or cabinets the step was done on: left, right or both\./g, `Tick ${holder} the step was done on.`);
}
