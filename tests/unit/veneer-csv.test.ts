import { describe, expect, test } from "vitest";
import { DEFECT_KINDS } from "@/lib/vocabulary/defects";
import { LEAF_CSV_COLUMNS, LEAF_CSV_TEMPLATE, parseLeafCsv, type LeafCsvResult } from "@/lib/veneer/csv";

// Every file below is made up for its test case.
const errorsOf = (r: LeafCsvResult) => {
  if (r.ok) throw new Error(`expected errors, got ${JSON.stringify(r.rows)}`);
  return r.errors;
};
const rowsOf = (r: LeafCsvResult) => {
  if (!r.ok) throw new Error(`expected rows, got ${JSON.stringify(r.errors)}`);
  return r.rows;
};

describe("parseLeafCsv: good files", () => {
  test("a comma-separated file with every column", () => {
    const text = [
      "seq,length_mm,width_mm,usable,defect,defect_note,defect_position_mm",
      "1,1012.5,214,yes,,,",
      "2,1010,213.5,no,split,runs from the butt end,120",
      "3,1008,,y,stain,,",
    ].join("\n");
    expect(rowsOf(parseLeafCsv(text, { leafCount: 12 }))).toEqual([
      { seq: 1, lengthMm: 1012.5, widthMm: 214, usable: true, defect: null },
      { seq: 2, lengthMm: 1010, widthMm: 213.5, usable: false, defect: { kind: "split", note: "runs from the butt end", positionMm: 120 } },
      { seq: 3, lengthMm: 1008, widthMm: null, usable: true, defect: { kind: "stain", note: "", positionMm: null } },
    ]);
  });

  test("semicolons with decimal commas, and Windows line ends", () => {
    const text = "seq;length_mm;width_mm;defect_position_mm;defect\r\n4;987,5;201,5;33,5;knot\r\n5;990;199;;\r\n";
    expect(rowsOf(parseLeafCsv(text, { leafCount: 9 }))).toEqual([
      { seq: 4, lengthMm: 987.5, widthMm: 201.5, usable: true, defect: { kind: "knot", note: "", positionMm: 33.5 } },
      { seq: 5, lengthMm: 990, widthMm: 199, usable: true, defect: null },
    ]);
  });

  test("tab-separated, with a decimal comma", () => {
    const text = "seq\tlength_mm\twidth_mm\n7\t1101,5\t188\n8\t1100\t187.5\n";
    expect(rowsOf(parseLeafCsv(text, { leafCount: 8 })).map((r) => [r.seq, r.lengthMm, r.widthMm])).toEqual([
      [7, 1101.5, 188],
      [8, 1100, 187.5],
    ]);
  });

  test("a UTF-8 byte order mark before the header is ignored", () => {
    const rows = rowsOf(parseLeafCsv("\ufeffseq,length_mm\n1,640\n", { leafCount: 3 }));
    expect(rows).toEqual([{ seq: 1, lengthMm: 640, widthMm: null, usable: true, defect: null }]);
  });

  test("header aliases, any case, with spaces around them", () => {
    const text = " Leaf No ; LENGTH MM ;Width; Usable ;Defect_Kind;NOTE;Position\n2;850;175;N;Mineral Streak;dark line;400\n";
    expect(rowsOf(parseLeafCsv(text, { leafCount: 5 }))).toEqual([
      { seq: 2, lengthMm: 850, widthMm: 175, usable: false, defect: { kind: "mineral streak", note: "dark line", positionMm: 400 } },
    ]);
    for (const h of ["seq", "leaf", "leaf no", "no"]) expect(rowsOf(parseLeafCsv(`${h},length\n1,500`, { leafCount: 1 }))[0]!.seq).toBe(1);
    for (const h of ["length_mm", "length", "length mm"]) expect(rowsOf(parseLeafCsv(`seq,${h}\n1,500`, { leafCount: 1 }))[0]!.lengthMm).toBe(500);
    for (const h of ["width_mm", "width", "width mm"]) expect(rowsOf(parseLeafCsv(`seq,${h}\n1,90`, { leafCount: 1 }))[0]!.widthMm).toBe(90);
    for (const h of ["defect_note", "note"]) expect(rowsOf(parseLeafCsv(`seq,defect,${h}\n1,hole,small`, { leafCount: 1 }))[0]!.defect?.note).toBe("small");
    for (const h of ["defect_position_mm", "position_mm", "position"]) expect(rowsOf(parseLeafCsv(`seq,defect,${h}\n1,hole,12`, { leafCount: 1 }))[0]!.defect?.positionMm).toBe(12);
  });

  test("usable: blank means yes; yes/no/y/n/true/false/1/0 in any case", () => {
    const values = ["", "yes", "no", "Y", "n", "TRUE", "false", "1", "0"];
    const text = ["seq,usable", ...values.map((v, i) => `${i + 1},${v}`)].join("\n");
    expect(rowsOf(parseLeafCsv(text, { leafCount: 9 })).map((r) => r.usable)).toEqual([true, true, false, true, false, true, false, true, false]);
  });

  test("every defect kind of the register is accepted, in any case", () => {
    const text = ["seq,defect", ...DEFECT_KINDS.map((k, i) => `${i + 1},${k.toUpperCase()}`)].join("\n");
    expect(rowsOf(parseLeafCsv(text, { leafCount: DEFECT_KINDS.length })).map((r) => r.defect?.kind)).toEqual([...DEFECT_KINDS]);
  });

  test("blank lines are skipped and line numbers still count them", () => {
    const r = parseLeafCsv("seq,length_mm\n\n1,500\n\n \n2,abc\n", { leafCount: 2 });
    expect(errorsOf(r)).toEqual([{ line: 6, column: "length_mm", message: expect.stringMatching(/abc/) }]);
  });
});

describe("parseLeafCsv: bad rows, one message each, naming line and column", () => {
  const header = "seq,length_mm,width_mm,usable,defect,defect_note,defect_position_mm";

  test("a length that is not a number", () => {
    expect(errorsOf(parseLeafCsv(`${header}\n1,about 900,200,,,,`, { leafCount: 4 }))).toEqual([
      { line: 2, column: "length_mm", message: "Length: “about 900” is not a number of millimetres." },
    ]);
  });

  test("a negative width", () => {
    const [e] = errorsOf(parseLeafCsv(`${header}\n1,900,200,,,,\n2,900,-200,,,,`, { leafCount: 4 }));
    expect(e).toMatchObject({ line: 3, column: "width_mm" });
    expect(e!.message).toMatch(/negative/);
  });

  test("zero, more than one decimal place, and more than 5000 mm", () => {
    const errors = errorsOf(parseLeafCsv(`seq,length_mm\n1,0\n2,900.25\n3,5000.1\n4,5000`, { leafCount: 4 }));
    expect(errors.map((e) => [e.line, e.column])).toEqual([
      [2, "length_mm"],
      [3, "length_mm"],
      [4, "length_mm"],
    ]);
    expect(errors[1]!.message).toMatch(/decimal place/);
    expect(errors[2]!.message).toMatch(/5000/);
  });

  test("a decimal comma in a comma-separated file is caught, not misread", () => {
    const [e] = errorsOf(parseLeafCsv("seq,length_mm,width_mm\n1,412,5,200\n", { leafCount: 4 }));
    expect(e!.line).toBe(2);
    expect(e!.message).toMatch(/decimal comma/);
  });

  test("seq out of range, not whole, or missing", () => {
    const errors = errorsOf(parseLeafCsv("seq,length_mm\n0,500\n13,500\n2.5,500\n,500\n", { leafCount: 12 }));
    expect(errors.map((e) => [e.line, e.column])).toEqual([
      [2, "seq"],
      [3, "seq"],
      [4, "seq"],
      [5, "seq"],
    ]);
    expect(errors[1]!.message).toBe("Leaf 13 is out of range: this flitch has leaves 1 to 12.");
  });

  test("more rows than leaves: each out-of-range seq gets its own message", () => {
    const text = ["seq", ...Array.from({ length: 5 }, (_, i) => String(i + 1))].join("\n");
    expect(errorsOf(parseLeafCsv(text, { leafCount: 3 })).map((e) => e.line)).toEqual([5, 6]);
  });

  test("a duplicate seq is an error on the second line, naming the first", () => {
    expect(errorsOf(parseLeafCsv("seq,length_mm\n1,500\n2,500\n1,510\n", { leafCount: 4 }))).toEqual([
      { line: 4, column: "seq", message: "Leaf 1 appears twice: it is already on line 2." },
    ]);
  });

  test("an unknown column names it and lists the accepted ones", () => {
    const errors = errorsOf(parseLeafCsv("seq,colour,length_mm\n1,amber,500\n", { leafCount: 4 }));
    expect(errors).toHaveLength(1);
    expect(errors[0]!.line).toBe(1);
    expect(errors[0]!.message).toMatch(/Unknown column “colour”/);
    for (const c of LEAF_CSV_COLUMNS) expect(errors[0]!.message).toContain(c);
  });

  test("a defect kind that is not in the register's list", () => {
    const [e] = errorsOf(parseLeafCsv(`${header}\n1,900,200,,crack,,`, { leafCount: 4 }));
    expect(e).toMatchObject({ line: 2, column: "defect" });
    expect(e!.message).toContain("crack");
    for (const k of DEFECT_KINDS) expect(e!.message).toContain(k);
  });

  test("a note or a position without a defect kind", () => {
    expect(errorsOf(parseLeafCsv(`${header}\n1,900,200,,,pale patch,\n2,900,200,,,,40`, { leafCount: 4 }))).toEqual([
      { line: 2, column: "defect_note", message: expect.stringMatching(/without a defect kind/) },
      { line: 3, column: "defect_position_mm", message: expect.stringMatching(/without a defect kind/) },
    ]);
  });

  test("an unclear usable value", () => {
    expect(errorsOf(parseLeafCsv("seq,usable\n1,maybe", { leafCount: 1 }))).toEqual([{ line: 2, column: "usable", message: expect.stringMatching(/maybe/) }]);
  });

  test("no seq column", () => {
    expect(errorsOf(parseLeafCsv("length_mm,width_mm\n900,200\n", { leafCount: 4 }))).toEqual([
      { line: 1, column: "seq", message: expect.stringMatching(/no seq column/) },
    ]);
  });

  test("an empty file, or one with only blank lines", () => {
    for (const text of ["", "\ufeff", "\n\n  \n"]) expect(errorsOf(parseLeafCsv(text, { leafCount: 4 }))).toEqual([{ line: 1, message: "The CSV is empty." }]);
  });

  test("a header without rows", () => {
    expect(errorsOf(parseLeafCsv("seq,length_mm\n", { leafCount: 4 }))[0]!.message).toMatch(/no leaf rows/);
  });

  test("one bad row among good ones fails the whole file, so the caller writes nothing", () => {
    const text = ["seq,length_mm,width_mm", "1,900,200", "2,901,201", "3,nine hundred,202", "4,903,203"].join("\n");
    const r = parseLeafCsv(text, { leafCount: 4 });
    expect(r.ok).toBe(false);
    expect("rows" in r).toBe(false);
    expect(errorsOf(r)).toEqual([{ line: 4, column: "length_mm", message: expect.any(String) }]);
  });

  test("every bad row is reported, not only the first", () => {
    const r = parseLeafCsv("seq,length_mm,width_mm\n1,x,200\n2,900,y\n3,900,200\n", { leafCount: 4 });
    expect(errorsOf(r).map((e) => [e.line, e.column])).toEqual([
      [2, "length_mm"],
      [3, "width_mm"],
    ]);
  });

  test("more than 500 rows are refused", () => {
    const text = ["seq", ...Array.from({ length: 501 }, () => "1")].join("\n");
    const errors = errorsOf(parseLeafCsv(text, { leafCount: 99 }));
    expect(errors.some((e) => /more than 500 rows/.test(e.message))).toBe(true);
  });
});

describe("LEAF_CSV_TEMPLATE", () => {
  test("has the canonical header and one row a leaf", () => {
    const t = LEAF_CSV_TEMPLATE(3);
    expect(t.split("\n")[0]).toBe("seq,length_mm,width_mm,usable,defect,defect_note,defect_position_mm");
    expect(t.trim().split("\n")).toHaveLength(4);
  });

  test("round-trips: the blank template parses to every leaf, unmeasured and usable", () => {
    for (const n of [1, 7, 24, 99]) {
      const rows = rowsOf(parseLeafCsv(LEAF_CSV_TEMPLATE(n), { leafCount: n }));
      expect(rows).toEqual(Array.from({ length: n }, (_, i) => ({ seq: i + 1, lengthMm: null, widthMm: null, usable: true, defect: null })));
    }
  });

  test("round-trips once filled in", () => {
    const filled = LEAF_CSV_TEMPLATE(2).replace("1,,,yes,,,", "1,955.5,210,yes,knot,tight,300").replace("2,,,yes,,,", "2,954,209,no,,,");
    expect(rowsOf(parseLeafCsv(filled, { leafCount: 2 }))).toEqual([
      { seq: 1, lengthMm: 955.5, widthMm: 210, usable: true, defect: { kind: "knot", note: "tight", positionMm: 300 } },
      { seq: 2, lengthMm: 954, widthMm: 209, usable: false, defect: null },
    ]);
  });
});
