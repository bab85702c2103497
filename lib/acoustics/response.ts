/**
 * Reading a measured frequency response from a plain-text file, as measuring programs export them:
 * one point a line, two or three columns (frequency Hz, level dB, optional phase degrees).
 * Pure TypeScript: a client component can check a file before it is sent and the server checks it
 * again with the same code.
 *
 * Format
 * - Columns are separated by whitespace (spaces or tabs), commas or semicolons. The separator is
 *   decided once, from the first data line: a semicolon if the line has one; else a comma if
 *   splitting at commas leaves no field with a space inside; else whitespace. Every later data line
 *   must use the same separator.
 * - A decimal comma ("87,2") is accepted when the separator is a semicolon or whitespace (with a
 *   comma separator a comma can only separate).
 * - A line whose first non-blank character is `*`, `#` or `;` is a comment; blank lines are skipped.
 * - The first line that is neither blank nor a comment may be a header: it is one when none of its
 *   fields is a number ("Freq(Hz) SPL(dB) Phase(deg)"). A non-number anywhere later is an error.
 * - A UTF-8 byte order mark and CRLF or CR line ends are tolerated. A trailing separator at the end of
 *   a line ("1000;87.2;") is ignored.
 *
 * Any problem makes the whole file fail, with one message per problem naming its 1-based line, so
 * nothing of a bad file is used. Problems that concern the file as a whole (too few points) name
 * its last line.
 */

export interface ResponseFilePoint {
  hz: number;
  db: number;
  /** Present only when the file has a third column. */
  phaseDeg?: number;
}

export interface ResponseFileError {
  /** 1-based line of the file. */
  line: number;
  message: string;
}

export type ResponseFileResult =
  | { ok: true; points: ResponseFilePoint[]; serialHint: string | null; header: string[] | null }
  | { ok: false; errors: ResponseFileError[] };

/** Lines read from one file at most. */
export const RESPONSE_MAX_LINES = 100_000;
/** Errors returned at most (the last of them says how many more there were). */
export const RESPONSE_MAX_ERRORS = 50;
/** Fewest data points a response needs. */
export const RESPONSE_MIN_POINTS = 3;
export const RESPONSE_LEVEL_RANGE_DB = [-50, 200] as const;
export const RESPONSE_PHASE_RANGE_DEG = [-360, 360] as const;

/** A register serial, e.g. D-TW-26-00042-7 (letter, 2–4 code, year, sequence, check). */
const SERIAL = /(?:^|[^A-Z0-9])([A-Z]-[A-Z0-9]{2,4}-\d{2}-\d{5}-[0-9A-Z*])(?![A-Z0-9*])/i;
const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
/** A number written with a decimal comma: digits on both sides of exactly one comma. */
const DECIMAL_COMMA_NUMBER = /^[+-]?\d+,\d+(?:[eE][+-]?\d+)?$/;
const COMMENT = /^[*#;]/;

type Separator = "semicolon" | "comma" | "whitespace";
const SEPARATOR_WORDS: Record<Separator, string> = { semicolon: "semicolons", comma: "commas", whitespace: "spaces or tabs" };

/** Finds a register serial in a line of text or a file name; upper-cased, or null. */
export function findSerialHint(text: string | null | undefined): string | null {
  if (!text) return null;
  const m = SERIAL.exec(text);
  return m ? m[1]!.toUpperCase() : null;
}

function chooseSeparator(line: string): Separator {
  if (line.includes(";")) return "semicolon";
  if (line.includes(",") && line.split(",").every((f) => !/\S\s+\S/.test(f.trim()))) return "comma";
  return "whitespace";
}

function splitFields(line: string, sep: Separator): string[] {
  const fields = sep === "whitespace" ? line.split(/\s+/) : line.split(sep === "semicolon" ? ";" : ",").map((f) => f.trim());
  if (sep !== "whitespace" && fields.length > 1 && fields[fields.length - 1] === "") fields.pop();
  return fields;
}

/** The number in a field, or null when it is not one (Infinity may come back from an overflow such as 1e999). */
function parseNumber(field: string, decimalComma: boolean): number | null {
  if (field.includes(",")) return decimalComma && DECIMAL_COMMA_NUMBER.test(field) ? Number(field.replace(",", ".")) : null;
  return NUMBER.test(field) ? Number(field) : null;
}

const looksLikeHeader = (line: string) =>
  line
    .split(/[\s,;]+/)
    .filter(Boolean)
    .every((tok) => parseNumber(tok, false) === null);

function headerFields(line: string): string[] {
  const sep = line.includes(";") ? ";" : line.includes("\t") ? "\t" : line.includes(",") ? "," : null;
  return (sep ? line.split(sep) : line.split(/\s+/)).map((f) => f.trim()).filter(Boolean);
}

const show = (v: string) => (v.length > 30 ? `“${v.slice(0, 30)}…”` : `“${v}”`);

/** Reads a response file; see the format at the top of this module. */
export function parseResponseFile(text: string, opts: { name?: string } = {}): ResponseFileResult {
  if (typeof text !== "string") return { ok: false, errors: [{ line: 1, message: "The file could not be read as text" }] };
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const lines = body.split(/\r\n|\n|\r/);
  if (lines.length > 1 && lines[lines.length - 1] === "") lines.pop(); // the final line end
  if (lines.length > RESPONSE_MAX_LINES) {
    return {
      ok: false,
      errors: [
        {
          line: RESPONSE_MAX_LINES + 1,
          message: `The file has more than ${RESPONSE_MAX_LINES.toLocaleString("en-GB")} lines (${lines.length.toLocaleString("en-GB")}); a response file may have at most ${RESPONSE_MAX_LINES.toLocaleString("en-GB")}`,
        },
      ],
    };
  }

  const serialHint = findSerialHint(lines[0]) ?? findSerialHint(opts.name);
  const errors: ResponseFileError[] = [];
  let errorCount = 0;
  const fail = (line: number, message: string) => {
    errorCount++;
    if (errors.length < RESPONSE_MAX_ERRORS) errors.push({ line, message });
  };

  const points: ResponseFilePoint[] = [];
  let header: string[] | null = null;
  let seenContent = false;
  let sep: Separator | null = null;
  let columns: { count: number; line: number } | null = null;
  let previous: { hz: number; line: number } | null = null;
  let dataLines = 0;
  const [levelMin, levelMax] = RESPONSE_LEVEL_RANGE_DB;
  const [phaseMin, phaseMax] = RESPONSE_PHASE_RANGE_DEG;

  lines.forEach((raw, i) => {
    const lineNo = i + 1;
    const line = raw.trim();
    if (line === "" || COMMENT.test(line)) return;
    if (!seenContent) {
      seenContent = true;
      if (looksLikeHeader(line)) {
        header = headerFields(line);
        return;
      }
    }
    dataLines++;
    sep ??= chooseSeparator(line);
    const fields = splitFields(line, sep);
    const decimalComma = sep !== "comma";

    const values: number[] = [];
    let bad = false;
    fields.forEach((f, k) => {
      const v = f === "" ? null : parseNumber(f, decimalComma);
      if (v === null) {
        bad = true;
        fail(lineNo, f === "" ? `Column ${k + 1} is empty` : `Column ${k + 1}: ${show(f)} is not a number`);
      } else values.push(v);
    });
    if (bad) return;

    if (values.length < 2 || values.length > 3) {
      fail(
        lineNo,
        `A data line needs 2 or 3 numbers (frequency Hz, level dB, optional phase degrees) separated by ${SEPARATOR_WORDS[sep]}; this one has ${values.length}`,
      );
      return;
    }
    if (columns && columns.count !== values.length) {
      fail(lineNo, `This line has ${values.length} columns but line ${columns.line} has ${columns.count}: every data line needs the same columns`);
      return;
    }
    columns ??= { count: values.length, line: lineNo };

    const [hz, db, phase] = values as [number, number, number | undefined];
    let lineOk = true;
    if (!Number.isFinite(hz)) {
      fail(lineNo, `The frequency ${show(fields[0]!)} is not a finite number`);
      lineOk = false;
    } else if (hz <= 0) {
      fail(lineNo, `The frequency must be above 0 Hz, got ${hz} Hz`);
      lineOk = false;
    } else {
      if (previous && hz <= previous.hz) {
        fail(lineNo, `The frequency ${hz} Hz is not above ${previous.hz} Hz on line ${previous.line}: frequencies must increase strictly from line to line`);
        lineOk = false;
      }
      previous = { hz, line: lineNo };
    }
    if (!Number.isFinite(db)) {
      fail(lineNo, `The level ${show(fields[1]!)} is not a finite number`);
      lineOk = false;
    } else if (db < levelMin || db > levelMax) {
      fail(lineNo, `The level ${db} dB is outside ${levelMin}…${levelMax} dB`);
      lineOk = false;
    }
    if (phase !== undefined) {
      if (!Number.isFinite(phase)) {
        fail(lineNo, `The phase ${show(fields[2]!)} is not a finite number`);
        lineOk = false;
      } else if (phase < phaseMin || phase > phaseMax) {
        fail(lineNo, `The phase ${phase}° is outside ${phaseMin}…${phaseMax}°`);
        lineOk = false;
      }
    }
    if (lineOk) points.push(phase === undefined ? { hz, db } : { hz, db, phaseDeg: phase });
  });

  if (dataLines < RESPONSE_MIN_POINTS) {
    fail(Math.max(1, lines.length), `The file holds ${dataLines} point${dataLines === 1 ? "" : "s"}; a response needs at least ${RESPONSE_MIN_POINTS}`);
  }
  if (errorCount > 0) {
    if (errorCount > RESPONSE_MAX_ERRORS) {
      const last = errors[RESPONSE_MAX_ERRORS - 1]!;
      errors[RESPONSE_MAX_ERRORS - 1] = {
        line: last.line,
        message: `…and ${errorCount - (RESPONSE_MAX_ERRORS - 1)} more problems from this line on (only the first ${RESPONSE_MAX_ERRORS - 1} are listed)`,
      };
    }
    return { ok: false, errors };
  }
  return { ok: true, points, serialHint, header };
}
