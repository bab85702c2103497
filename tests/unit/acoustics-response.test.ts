import { describe, expect, test } from "vitest";
import { findSerialHint, parseResponseFile, RESPONSE_MAX_ERRORS, RESPONSE_MAX_LINES, type ResponseFileResult } from "@/lib/acoustics";

// Every file below is made up for its test case; the expected values follow from the format's definition.
const ok = (r: ResponseFileResult) => {
  if (!r.ok) throw new Error(`expected points, got ${JSON.stringify(r.errors)}`);
  return r;
};
const errorsOf = (r: ResponseFileResult) => {
  if (r.ok) throw new Error(`expected errors, got ${JSON.stringify(r.points)}`);
  return r.errors;
};
const THREE = [
  { hz: 100, db: 85.5 },
  { hz: 1000, db: 87.25 },
  { hz: 10000, db: 86 },
];

describe("parseResponseFile: good files", () => {
  test("spaces", () => {
    const r = ok(parseResponseFile("100 85.5\n1000   87.25\n10000 86\n"));
    expect(r).toEqual({ ok: true, points: THREE, serialHint: null, header: null });
  });

  test("tabs, with leading and trailing whitespace", () => {
    expect(ok(parseResponseFile("  100\t85.5\n1000\t\t87.25 \n\t10000\t86")).points).toEqual(THREE);
  });

  test("commas, with or without a space after", () => {
    expect(ok(parseResponseFile("100,85.5\n1000, 87.25\n10000 ,86\n")).points).toEqual(THREE);
  });

  test("semicolons with decimal commas", () => {
    expect(ok(parseResponseFile("100;85,5\n1000,5;87,2\n10000;86\n")).points).toEqual([
      { hz: 100, db: 85.5 },
      { hz: 1000.5, db: 87.2 },
      { hz: 10000, db: 86 },
    ]);
  });

  test("whitespace with decimal commas", () => {
    expect(ok(parseResponseFile("100 85,5\n1000,5\t87,2\n10000 86\n")).points).toEqual([
      { hz: 100, db: 85.5 },
      { hz: 1000.5, db: 87.2 },
      { hz: 10000, db: 86 },
    ]);
  });

  test("a trailing separator is ignored", () => {
    expect(ok(parseResponseFile("100;85,5;\n1000;87,25;\n10000;86;\n")).points).toEqual(THREE);
  });

  test("three columns with phase", () => {
    expect(ok(parseResponseFile("20 80.1 -170.5\n1000 87 0\n20000 84 359\n")).points).toEqual([
      { hz: 20, db: 80.1, phaseDeg: -170.5 },
      { hz: 1000, db: 87, phaseDeg: 0 },
      { hz: 20000, db: 84, phaseDeg: 359 },
    ]);
  });

  test("exponents and signs", () => {
    expect(ok(parseResponseFile("1e2 +85.5\n1.0E3 87.25\n.1e5 86\n")).points).toEqual(THREE);
  });

  test("comments with *, # and ;, indented or not, and blank lines", () => {
    const text = ["* exported by the bench", "# another comment", "", "  ; indented comment", "100 85.5", "   ", "* mid-file", "1000 87.25", "#", "10000 86"].join("\n");
    expect(ok(parseResponseFile(text)).points).toEqual(THREE);
  });

  test("a header line, after comments", () => {
    const r = ok(parseResponseFile("* bench export\nFreq(Hz) SPL(dB) Phase(deg)\n100 85.5 10\n1000 87.25 0\n10000 86 -10\n"));
    expect(r.header).toEqual(["Freq(Hz)", "SPL(dB)", "Phase(deg)"]);
    expect(r.points.map((p) => p.phaseDeg)).toEqual([10, 0, -10]);
  });

  test("header fields split at the header's own separator", () => {
    expect(ok(parseResponseFile("Frequency (Hz);Level (dB)\n100;85,5\n1000;87,25\n10000;86")).header).toEqual(["Frequency (Hz)", "Level (dB)"]);
    expect(ok(parseResponseFile("hz,db\n100,85.5\n1000,87.25\n10000,86")).header).toEqual(["hz", "db"]);
  });

  test("a byte order mark and CRLF line ends", () => {
    const r = ok(parseResponseFile("\uFEFFFreq\tSPL\r\n100\t85.5\r\n1000\t87.25\r\n10000\t86\r\n"));
    expect(r.points).toEqual(THREE);
    expect(r.header).toEqual(["Freq", "SPL"]);
  });

  test("old Mac CR line ends", () => {
    expect(ok(parseResponseFile("100 85.5\r1000 87.25\r10000 86\r")).points).toEqual(THREE);
  });

  test("a serial in the first line, a comment, is found and upper-cased", () => {
    const r = ok(parseResponseFile("* unit d-tw-26-00042-7, left, 2.83 V\n100 85.5\n1000 87.25\n10000 86\n", { name: "D-BS-26-00001-K.txt" }));
    expect(r.serialHint).toBe("D-TW-26-00042-7");
  });

  test("a serial in a first line that is a header", () => {
    expect(ok(parseResponseFile("Freq D-MR-26-00107-* SPL\n100 85.5\n1000 87.25\n10000 86\n")).serialHint).toBe("D-MR-26-00107-*");
  });

  test("else the serial in the file name", () => {
    expect(ok(parseResponseFile("100 85.5\n1000 87.25\n10000 86\n", { name: "left_d-bs-26-00001-k.frd" })).serialHint).toBe("D-BS-26-00001-K");
    expect(ok(parseResponseFile("100 85.5\n1000 87.25\n10000 86\n", { name: "bench-D-BS-26-00001-K-left.txt" })).serialHint).toBe("D-BS-26-00001-K");
  });

  test("a serial only on a later line, or none at all, gives null", () => {
    expect(ok(parseResponseFile("* bench export\n* D-TW-26-00042-7\n100 85.5\n1000 87.25\n10000 86\n")).serialHint).toBeNull();
    expect(ok(parseResponseFile("100 85.5\n1000 87.25\n10000 86\n", { name: "left.txt" })).serialHint).toBeNull();
  });

  test("findSerialHint needs the whole token", () => {
    expect(findSerialHint("D-TW-26-00042-7")).toBe("D-TW-26-00042-7");
    expect(findSerialHint("XD-TW-26-00042-7")).toBeNull();
    expect(findSerialHint("D-TW-26-000421-7")).toBeNull();
    expect(findSerialHint("D-TW-26-00042-77")).toBeNull();
    expect(findSerialHint("D-TOOLONG-26-00042-7")).toBeNull();
    expect(findSerialHint(undefined)).toBeNull();
  });
});

describe("parseResponseFile: broken files name the line", () => {
  test("a data line with one number", () => {
    expect(errorsOf(parseResponseFile("100 85\n1000\n10000 86\n20000 80\n"))).toEqual([{ line: 2, message: expect.stringMatching(/2 or 3 numbers.*has 1/) }]);
  });

  test("a data line with four numbers", () => {
    expect(errorsOf(parseResponseFile("100 85\n1000 87 0 1\n10000 86\n"))).toEqual([{ line: 2, message: expect.stringMatching(/has 4/) }]);
  });

  test("a non-number", () => {
    expect(errorsOf(parseResponseFile("* c\n100 85\n1000 8x7\n10000 86\n"))).toEqual([{ line: 3, message: expect.stringMatching(/Column 2: “8x7” is not a number/) }]);
  });

  test("a second header-like line is a non-number", () => {
    expect(errorsOf(parseResponseFile("Freq SPL\n100 85\nFreq SPL\n1000 87\n10000 86\n"))).toEqual([
      { line: 3, message: expect.stringMatching(/Column 1: “Freq” is not a number/) },
      { line: 3, message: expect.stringMatching(/Column 2: “SPL” is not a number/) },
    ]);
  });

  test("an empty field between separators", () => {
    expect(errorsOf(parseResponseFile("100;;85\n1000;87\n10000;86\n"))).toEqual([{ line: 1, message: "Column 2 is empty" }]);
  });

  test("a decimal comma with comma separators is two columns", () => {
    // "1000,5,87" with commas as separators is three numbers: 1000, 5 and 87 (phase 87°), unlike the other lines.
    expect(errorsOf(parseResponseFile("100,85\n1000,5,87\n10000,86\n"))).toEqual([{ line: 2, message: expect.stringMatching(/3 columns but line 1 has 2/) }]);
  });

  test("a line using another separator than the first data line", () => {
    expect(errorsOf(parseResponseFile("100;85\n1000 87\n10000;86\n"))).toEqual([
      { line: 2, message: expect.stringMatching(/“1000 87” is not a number/) },
    ]);
  });

  test("a frequency of 0 or below", () => {
    expect(errorsOf(parseResponseFile("0 85\n1000 87\n10000 86\n"))).toEqual([{ line: 1, message: expect.stringMatching(/above 0 Hz, got 0 Hz/) }]);
    expect(errorsOf(parseResponseFile("-20 85\n1000 87\n10000 86\n"))).toEqual([{ line: 1, message: expect.stringMatching(/above 0 Hz, got -20 Hz/) }]);
  });

  test("non-finite values", () => {
    expect(errorsOf(parseResponseFile("100 85\n1e999 87\n10000 86\n"))).toEqual([{ line: 2, message: expect.stringMatching(/frequency “1e999” is not a finite number/) }]);
    expect(errorsOf(parseResponseFile("100 85\n1000 -1e400\n10000 86\n"))).toEqual([{ line: 2, message: expect.stringMatching(/level “-1e400” is not a finite number/) }]);
    expect(errorsOf(parseResponseFile("100 85 0\n1000 87 1e999\n10000 86 0\n"))).toEqual([{ line: 2, message: expect.stringMatching(/phase “1e999” is not a finite number/) }]);
    expect(errorsOf(parseResponseFile("100 85\n1000 NaN\n10000 Infinity\n"))).toEqual([
      { line: 2, message: expect.stringMatching(/“NaN” is not a number/) },
      { line: 3, message: expect.stringMatching(/“Infinity” is not a number/) },
    ]);
  });

  test("frequencies not strictly increasing name both lines", () => {
    expect(errorsOf(parseResponseFile("100 85\n* c\n1000 87\n1000 86\n500 86\n20000 80\n"))).toEqual([
      { line: 4, message: expect.stringMatching(/1000 Hz is not above 1000 Hz on line 3/) },
      { line: 5, message: expect.stringMatching(/500 Hz is not above 1000 Hz on line 4/) },
    ]);
  });

  test("mixed column counts, 2 then 3", () => {
    expect(errorsOf(parseResponseFile("100 85\n1000 87\n10000 86 12\n"))).toEqual([
      { line: 3, message: expect.stringMatching(/3 columns but line 1 has 2/) },
    ]);
  });

  test("fewer than 3 data points", () => {
    expect(errorsOf(parseResponseFile("* c\nFreq SPL\n100 85\n1000 87\n"))).toEqual([{ line: 4, message: "The file holds 2 points; a response needs at least 3" }]);
    expect(errorsOf(parseResponseFile(""))).toEqual([{ line: 1, message: "The file holds 0 points; a response needs at least 3" }]);
    expect(errorsOf(parseResponseFile("* only a comment\n100 85\n"))).toEqual([{ line: 2, message: "The file holds 1 point; a response needs at least 3" }]);
  });

  test("more than 100,000 lines", () => {
    const text = Array.from({ length: RESPONSE_MAX_LINES + 1 }, (_, i) => `${i + 1} 85`).join("\n");
    expect(errorsOf(parseResponseFile(text))).toEqual([{ line: 100_001, message: expect.stringMatching(/more than 100,000 lines/) }]);
    // Exactly 100,000 lines (with a final line end) is accepted.
    expect(ok(parseResponseFile(Array.from({ length: RESPONSE_MAX_LINES }, (_, i) => `${i + 1} 85\n`).join(""))).points).toHaveLength(RESPONSE_MAX_LINES);
  });

  test("a level outside −50…200 dB", () => {
    expect(errorsOf(parseResponseFile("100 -50.5\n1000 87\n10000 200.1\n"))).toEqual([
      { line: 1, message: expect.stringMatching(/level -50.5 dB is outside -50…200 dB/) },
      { line: 3, message: expect.stringMatching(/level 200.1 dB is outside/) },
    ]);
    expect(ok(parseResponseFile("100 -50\n1000 87\n10000 200\n")).points).toHaveLength(3);
  });

  test("a phase outside −360…360°", () => {
    expect(errorsOf(parseResponseFile("100 85 -361\n1000 87 0\n10000 86 360.5\n"))).toEqual([
      { line: 1, message: expect.stringMatching(/phase -361° is outside -360…360°/) },
      { line: 3, message: expect.stringMatching(/phase 360.5° is outside/) },
    ]);
    expect(ok(parseResponseFile("100 85 -360\n1000 87 0\n10000 86 360\n")).points).toHaveLength(3);
  });

  test("every error is reported, with nothing of the file returned", () => {
    const r = parseResponseFile("100 85\n50 87\n1000 abc\n2000 300\n");
    expect(r).toEqual({
      ok: false,
      errors: [
        { line: 2, message: expect.stringMatching(/not above 100 Hz on line 1/) },
        { line: 3, message: expect.stringMatching(/not a number/) },
        { line: 4, message: expect.stringMatching(/outside/) },
      ],
    });
    expect("points" in r).toBe(false);
  });

  test("errors are capped at 50, the last saying how many more", () => {
    const text = Array.from({ length: 80 }, (_, i) => `${i + 1} x`).join("\n");
    const errors = errorsOf(parseResponseFile(text));
    expect(errors).toHaveLength(RESPONSE_MAX_ERRORS);
    expect(errors[48]).toEqual({ line: 49, message: expect.stringMatching(/not a number/) });
    expect(errors[49]).toEqual({ line: 50, message: expect.stringMatching(/and 31 more problems/) });
  });
});
