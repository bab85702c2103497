/**
 * What the lab types in when units arrive: the number of units against the makers' serials, and
 * the Thiele–Small CSV read row by row. Expected values follow from the text typed in each case
 * (no outside source is involved); serials are invented.
 */
import { describe, expect, test } from "vitest";
import { batchSchema } from "@/app/(workshop)/lab/schemas";
import { batchCountMismatch, splitMakerSerials } from "@/lib/lab/batch-count";
import { readTsCsv } from "@/lib/lab/ts-csv";

describe("the number of units and the makers' serials", () => {
  test.each<[string, string[]]>([
    ["MK1\nMK2\nMK3", ["MK1", "MK2", "MK3"]],
    ["MK1, MK2;MK3\tMK4", ["MK1", "MK2", "MK3", "MK4"]],
    ["\n  MK1  \n\n", ["MK1"]],
    ["", []],
  ])("%j is scanned as %j", (text, serials) => {
    expect(splitMakerSerials(text)).toEqual(serials);
  });

  test.each<[number, number, string | null]>([
    [0, 6, null], // no number typed: one unit per serial
    [6, 0, null], // no serials: the number typed
    [6, 6, null],
    [5, 6, "The number of units is 5, but 6 makers' serials are scanned. Leave the number empty to register one unit per serial, or check the list."],
    [2, 1, "The number of units is 2, but 1 makers' serial is scanned. Leave the number empty to register one unit per serial, or check the list."],
  ])("%i units typed with %i serials scanned: %s", (count, serials, message) => {
    expect(batchCountMismatch(count, serials)).toBe(message);
  });

  const form = (count: string, serials: string) => ({ partType: "tweeter", partNumber: "T-1", maker: "A maker", lot: "L1", receivedOn: "2026-01-05", count, makerSerials: serials });

  test.each<[string, string, number | null]>([
    ["", "A1\nA2\nA3\nA4\nA5\nA6", 6],
    ["6", "A1\nA2\nA3\nA4\nA5\nA6", 6],
    ["4", "", 4],
    ["5", "A1\nA2\nA3\nA4\nA5\nA6", null], // the case from the lab: five typed, six scanned
  ])("the form with %j units and serials %j holds %s units", (count, serials, units) => {
    const parsed = batchSchema.safeParse(form(count, serials));
    if (units === null) {
      expect(parsed.success).toBe(false);
      expect(parsed.error?.issues.map((i) => [i.path.join("."), i.message])).toEqual([["count", batchCountMismatch(5, 6)]]);
    } else {
      expect(parsed.success).toBe(true);
      expect(parsed.data!.makerSerials.length || parsed.data!.count).toBe(units);
    }
  });
});

describe("the Thiele–Small CSV is read in full, every row with its own problems", () => {
  test("a good file: decimal commas under a semicolon, every value read", () => {
    const read = readTsCsv("serial;fs;qts;re\nMK1;37,5;0,38;6,1\nMK2;38;0,4;");
    expect(read.fileProblems).toEqual([]);
    expect(read.rows).toEqual([
      { line: 2, serial: "MK1", ts: { fsHz: 37.5, qts: 0.38, qes: null, qms: null, reOhm: 6.1, vasL: null, sensitivityDb: null }, problems: [] },
      { line: 3, serial: "MK2", ts: { fsHz: 38, qts: 0.4, qes: null, qms: null, reOhm: null, vasL: null, sensitivityDb: null }, problems: [] },
    ]);
  });

  test("rows with problems are kept, with every problem of each, and an unknown column does not stop the rows being read", () => {
    const read = readTsCsv("serial,fs,qts,colour\nMK1,abc,x,red\n\nMK1,40,0.4,red\n,41,,");
    expect(read.fileProblems).toEqual(['Line 1: unknown column "colour"; the columns are serial,fs,qts,qes,qms,re,vas,sensitivity.']);
    expect(read.rows.map((r) => [r.line, r.serial, r.problems])).toEqual([
      [2, "MK1", ['Fs "abc" is not a number.', 'Qts "x" is not a number.']],
      [4, "MK1", ["MK1 already has a row (line 2)."]],
      [5, "", ["no serial: give the unit's Twinleaf serial or the maker's."]],
    ]);
    expect(read.rows[1]!.ts.fsHz).toBe(40);
  });

  test.each<[string, string]>([
    ["", "The CSV is empty."],
    ["fs,qts\n40,0.4", "Line 1: a serial column is needed to know which unit each row is for."],
    [`serial,fs\n${Array.from({ length: 1001 }, (_, i) => `MK${i},40`).join("\n")}`, "At most 1,000 rows at once; this file has 1,001. Split it and bring the parts in one after the other."],
  ])("a file that cannot be read row by row: %#", (text, problem) => {
    const read = readTsCsv(text);
    expect(read.rows).toEqual([]);
    expect(read.fileProblems).toContain(problem);
  });
});
