import { describe, expect, test } from "vitest";
import { compactText, phrase, trigrams, typoPieces } from "@/lib/search/text";

describe("how a query meets the search index", () => {
  // Expected values worked by hand from the rule in lib/search/text.ts (the same characters the
  // search_index migration's triggers remove).
  test.each([
    ["a lot as printed", "LOT-CAP-2506-A", "LOTCAP2506A"],
    ["a lot as typed", "cap 2506", "cap2506"],
    ["a leaf identity", "F-OAK-26-00777-R/03", "FOAK2600777R03"],
    ["an e-mail address", "idunn.a@owners.test", "idunnaownerstest"],
    ["a name with an apostrophe and a comma", "O'Brannock, Tamsin", "OBrannockTamsin"],
    ["letters with accents are kept (the tokenizer folds them)", "Zoë Ångström", "ZoëÅngström"],
  ])("compactText: %s", (_label, input, expected) => {
    expect(compactText(input)).toBe(expected);
  });

  test.each([
    ["plain text", "PW226", '"PW226"'],
    // FTS5 query syntax: a double quote inside a string is written twice (sqlite.org/fts5.html §3.1).
    ["a double quote inside", 'ab"c', '"ab""c"'],
    ["an operator word stays text", "NOT", '"NOT"'],
  ])("phrase: %s", (_label, input, expected) => {
    expect(phrase(input)).toBe(expected);
  });

  test.each([
    // Six characters: halves only (thirds would be two characters, below the tokenizer's three).
    ["Quilon", ['"qui"', '"lon"']],
    // Nine: halves (rounded cut at 4.5 → 5) and thirds.
    ["merowlane", ['"merow"', '"lane"', '"mer"', '"owl"', '"ane"']],
    // Under six: the trigrams.
    ["Quil", ['"qui"', '"uil"']],
  ])("typoPieces(%s)", (input, expected) => {
    expect(typoPieces(input)).toEqual(expected);
  });

  test("trigrams are distinct and lower case", () => {
    expect(trigrams("AAAA")).toEqual(['"aaa"']);
  });
});
