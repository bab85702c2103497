/**
 * Reading the veneer room's leaf measurements from a CSV file (one row a leaf). Pure: no server
 * import, so a client component can check a file before it is sent, and the server checks it again.
 *
 * The file is read with papaparse (header row, delimiter guessed among comma, semicolon and tab,
 * blank lines skipped, a UTF-8 byte order mark tolerated). Every row is checked; any bad row makes
 * the whole file fail with one message per problem, naming the line and the column, so the caller
 * applies nothing until the file is good.
 */
import Papa from "papaparse";
import { DEFECT_KINDS, type DefectKind } from "@/lib/vocabulary/defects";

export interface LeafCsvRow {
  seq: number;
  lengthMm: number | null;
  widthMm: number | null;
  usable: boolean;
  defect: { kind: DefectKind; note: string; positionMm: number | null } | null;
}

export interface LeafCsvError {
  /** 1-based line in the text; the header is line 1. */
  line: number;
  /** The column's canonical name (as in the template), when the problem is in one column. */
  column?: string;
  message: string;
}

export type LeafCsvResult = { ok: true; rows: LeafCsvRow[] } | { ok: false; errors: LeafCsvError[] };

/** Canonical column names, in template order. */
export const LEAF_CSV_COLUMNS = ["seq", "length_mm", "width_mm", "usable", "defect", "defect_note", "defect_position_mm"] as const;
export type LeafCsvColumn = (typeof LEAF_CSV_COLUMNS)[number];

/** Header spellings accepted for each column (compared trimmed, lower-case, inner spaces collapsed). */
export const LEAF_CSV_ALIASES: Record<LeafCsvColumn, readonly string[]> = {
  seq: ["seq", "leaf", "leaf no", "no"],
  length_mm: ["length_mm", "length", "length mm"],
  width_mm: ["width_mm", "width", "width mm"],
  usable: ["usable"],
  defect: ["defect", "defect_kind"],
  defect_note: ["defect_note", "note"],
  defect_position_mm: ["defect_position_mm", "position_mm", "position"],
};

/** Rows read from one file at most. */
export const LEAF_CSV_MAX_ROWS = 500;
/** Largest length, width or defect position accepted, mm. */
export const LEAF_CSV_MAX_MM = 5000;

const ALIAS_TO_COLUMN = new Map<string, LeafCsvColumn>(
  LEAF_CSV_COLUMNS.flatMap((c) => LEAF_CSV_ALIASES[c].map((a) => [a, c] as const)),
);

const YES = new Set(["yes", "y", "true", "1"]);
const NO = new Set(["no", "n", "false", "0"]);

const normHeader = (h: string) => h.trim().toLowerCase().replace(/\s+/g, " ");
const normKind = (k: string) => k.trim().toLowerCase().replace(/[\s_-]+/g, " ");
const show = (v: string) => (v.length > 40 ? `“${v.slice(0, 40)}…”` : `“${v}”`);

/**
 * papaparse 5.5 passes each header through transformHeader twice (once in its parser, once when
 * it fills the fields), and renames repeated headers with a console warning. Prefixing each
 * header with its position, idempotently, keeps keys unique and lets this module name repeats.
 */
const KEYED = /^#(\d+)#/;
const keyHeader = (h: string, i: number) => (KEYED.test(h) ? h : `#${i}#${h}`);
const rawHeader = (key: string) => key.replace(KEYED, "");

/** A blank template for a flitch of `leafCount` leaves: the header and one row a leaf. */
export function LEAF_CSV_TEMPLATE(leafCount: number): string {
  const n = Math.max(0, Math.min(Math.floor(leafCount), LEAF_CSV_MAX_ROWS));
  const rows = Array.from({ length: n }, (_, i) => `${i + 1},,,yes,,,`);
  return [LEAF_CSV_COLUMNS.join(","), ...rows].join("\n") + "\n";
}

/**
 * A measurement in mm: positive (or zero when `allowZero`), at most one decimal place, at most
 * 5000. A decimal comma is read as a point when the file is not comma-separated.
 */
function readMm(raw: string, decimalComma: boolean, allowZero: boolean): { value: number } | { error: string } {
  let s = raw.trim();
  if (decimalComma) s = s.replace(",", ".");
  if (!/^(\d+(\.\d*)?|\.\d+)$/.test(s)) {
    if (/^-\s*\d/.test(s)) return { error: `${show(raw)} is negative; a size in mm must be more than 0.` };
    if (!decimalComma && /^\d+,\d+$/.test(s)) return { error: `${show(raw)} uses a decimal comma; in a comma-separated file write a point (412.5).` };
    return { error: `${show(raw)} is not a number of millimetres.` };
  }
  const value = Number(s);
  if (Math.abs(value * 10 - Math.round(value * 10)) > 1e-9) return { error: `${show(raw)} has more than one decimal place; give mm to 0.1 at most.` };
  if (value === 0 && !allowZero) return { error: `${show(raw)}: a size in mm must be more than 0.` };
  if (value > LEAF_CSV_MAX_MM) return { error: `${show(raw)} is more than ${LEAF_CSV_MAX_MM} mm.` };
  return { value: Math.round(value * 10) / 10 };
}

/** Parse and check a leaf measurement file for a flitch of `leafCount` leaves (seq 1…leafCount). */
export function parseLeafCsv(text: string, opts: { leafCount: number }): LeafCsvResult {
  const input = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (input.trim() === "") return { ok: false, errors: [{ line: 1, message: "The CSV is empty." }] };

  type Raw = { line: number; values: Record<string, string>; extra: string[]; errors: Papa.ParseError[] };
  const raws: Raw[] = [];
  let fields: string[] = [];
  let delimiter = ",";
  let linebreak = "\n";
  let tooMany = false;
  // Offsets of line breaks, to turn papaparse's cursor into a line number.
  let breaks: number[] | null = null;
  const lineAt = (offset: number) => {
    if (!breaks) {
      breaks = [];
      for (let i = input.indexOf(linebreak); i !== -1; i = input.indexOf(linebreak, i + linebreak.length)) breaks.push(i);
    }
    let lo = 0;
    let hi = breaks.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (breaks[mid]! < offset) lo = mid + 1;
      else hi = mid;
    }
    return lo + 1;
  };

  Papa.parse<Record<string, string | string[] | undefined>>(input, {
    header: true,
    delimitersToGuess: [",", ";", "\t"],
    skipEmptyLines: "greedy",
    transformHeader: keyHeader,
    step: (result, parser) => {
      delimiter = result.meta.delimiter;
      linebreak = result.meta.linebreak || "\n";
      fields = result.meta.fields ?? fields;
      if (raws.length >= LEAF_CSV_MAX_ROWS) {
        tooMany = true;
        parser.abort();
        return;
      }
      const values: Record<string, string> = {};
      let extra: string[] = [];
      let innerBreaks = 0;
      for (const [key, v] of Object.entries(result.data)) {
        if (key === "__parsed_extra") extra = (v as string[] | undefined) ?? [];
        else if (typeof v === "string") values[key] = v;
      }
      for (const v of [...Object.values(values), ...extra]) innerBreaks += v.split(linebreak).length - 1;
      // The cursor stands after the row's line break (or at the end of the text).
      const cursor = result.meta.cursor;
      const end = input.slice(cursor - linebreak.length, cursor) === linebreak ? cursor - linebreak.length : cursor;
      raws.push({ line: lineAt(end) - innerBreaks, values, extra, errors: result.errors });
    },
  });

  // The header: the first line with anything on it (papaparse skips blank lines before it).
  const headerLine = (() => {
    const lines = input.split(/\r\n|\r|\n/);
    const i = lines.findIndex((l) => l.split(delimiter).join("").trim() !== "");
    return i === -1 ? 1 : i + 1;
  })();

  // Map the header to canonical columns.
  const headerErrors: LeafCsvError[] = [];
  const keyOf = new Map<LeafCsvColumn, string>();
  const unknown: string[] = [];
  for (const key of fields) {
    const raw = rawHeader(key);
    const name = normHeader(raw);
    if (name === "") {
      unknown.push("(a column with no name)");
      continue;
    }
    const column = ALIAS_TO_COLUMN.get(name);
    if (!column) {
      unknown.push(`“${raw.trim()}”`);
      continue;
    }
    const seen = keyOf.get(column);
    if (seen !== undefined) {
      const a = rawHeader(seen).trim();
      const b = raw.trim();
      headerErrors.push({
        line: headerLine,
        column,
        message: a.toLowerCase() === b.toLowerCase() ? `The column “${b}” appears twice in the header.` : `The columns “${a}” and “${b}” both mean ${column}; keep one.`,
      });
      continue;
    }
    keyOf.set(column, key);
  }
  if (unknown.length > 0) {
    const accepted = LEAF_CSV_COLUMNS.map((c) => LEAF_CSV_ALIASES[c].join(" | ")).join("; ");
    headerErrors.push({
      line: headerLine,
      message: `Unknown column${unknown.length > 1 ? "s" : ""} ${unknown.join(", ")}. Accepted columns: ${accepted}.`,
    });
  }
  if (fields.length > 0 && !keyOf.has("seq")) {
    headerErrors.push({ line: headerLine, column: "seq", message: `The header has no seq column (the leaf's number in slicing order; also accepted: ${LEAF_CSV_ALIASES.seq.slice(1).join(", ")}).` });
  }
  if (headerErrors.length > 0) return { ok: false, errors: headerErrors };
  if (raws.length === 0) return { ok: false, errors: [{ line: headerLine, message: "The CSV has a header but no leaf rows." }] };

  const errors: LeafCsvError[] = [];
  if (tooMany) errors.push({ line: raws[raws.length - 1]!.line + 1, message: `The CSV has more than ${LEAF_CSV_MAX_ROWS} rows; send at most ${LEAF_CSV_MAX_ROWS} at once.` });

  const decimalComma = delimiter !== ",";
  const firstLineOfSeq = new Map<number, number>();
  const rows: LeafCsvRow[] = [];
  for (const raw of raws) {
    const { line } = raw;
    const rowErrors: LeafCsvError[] = [];
    const fail = (column: LeafCsvColumn | undefined, message: string) => rowErrors.push(column ? { line, column, message } : { line, message });
    const get = (c: LeafCsvColumn) => {
      const key = keyOf.get(c);
      return key === undefined ? "" : (raw.values[key] ?? "").trim();
    };

    for (const e of raw.errors) {
      if (e.type === "Delimiter") continue; // a one-column file has nothing to guess from; the comma default is right
      if (e.code === "TooManyFields") fail(undefined, `This row has ${fields.length + raw.extra.length} values but the header has ${fields.length} columns${decimalComma ? "" : " (a decimal comma in a comma-separated file splits a value in two)"}.`);
      else if (e.code === "TooFewFields") fail(undefined, `This row has fewer values than the header's ${fields.length} columns.`);
      else if (e.type === "Quotes") fail(undefined, 'This row has a quote (") that is not closed.');
      else fail(undefined, e.message);
    }

    // seq
    let seq: number | null = null;
    const seqText = get("seq");
    if (seqText === "") fail("seq", "The leaf number (seq) is missing.");
    else if (!/^\d+$/.test(seqText)) fail("seq", `${show(seqText)} is not a whole leaf number.`);
    else {
      const n = Number(seqText);
      if (n < 1 || n > opts.leafCount) fail("seq", `Leaf ${n} is out of range: this flitch has leaves 1 to ${opts.leafCount}.`);
      else {
        const first = firstLineOfSeq.get(n);
        if (first !== undefined) fail("seq", `Leaf ${n} appears twice: it is already on line ${first}.`);
        else {
          firstLineOfSeq.set(n, line);
          seq = n;
        }
      }
    }

    // sizes
    const size = (c: "length_mm" | "width_mm", what: string): number | null => {
      const t = get(c);
      if (t === "") return null;
      const r = readMm(t, decimalComma, false);
      if ("error" in r) {
        fail(c, `${what}: ${r.error}`);
        return null;
      }
      return r.value;
    };
    const lengthMm = size("length_mm", "Length");
    const widthMm = size("width_mm", "Width");

    // usable
    let usable = true;
    const u = get("usable").toLowerCase();
    if (u !== "") {
      if (YES.has(u)) usable = true;
      else if (NO.has(u)) usable = false;
      else fail("usable", `Usable is ${show(get("usable"))}; write yes or no (y/n, true/false, 1/0), or leave it blank for yes.`);
    }

    // defect
    let defect: LeafCsvRow["defect"] = null;
    const kindText = get("defect");
    const note = get("defect_note");
    const posText = get("defect_position_mm");
    let positionMm: number | null = null;
    if (posText !== "") {
      const r = readMm(posText, decimalComma, true);
      if ("error" in r) fail("defect_position_mm", `Defect position: ${r.error}`);
      else if (lengthMm !== null && r.value > lengthMm) fail("defect_position_mm", `The defect position ${r.value} mm is beyond the leaf's length of ${lengthMm} mm.`);
      else positionMm = r.value;
    }
    if (kindText === "") {
      if (note !== "") fail("defect_note", "A defect note is given without a defect kind; name the defect or clear the note.");
      if (posText !== "") fail("defect_position_mm", "A defect position is given without a defect kind; name the defect or clear the position.");
    } else {
      const kind = DEFECT_KINDS.find((k) => k === normKind(kindText));
      if (!kind) fail("defect", `The defect ${show(kindText)} is not one of: ${DEFECT_KINDS.join(", ")}.`);
      else defect = { kind, note, positionMm };
    }

    if (rowErrors.length > 0) errors.push(...rowErrors);
    else if (seq !== null) rows.push({ seq, lengthMm, widthMm, usable, defect });
  }

  if (errors.length > 0) return { ok: false, errors };
  return { ok: true, rows };
}
