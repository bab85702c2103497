import Papa from "papaparse";
import { TS_FIELDS, type TsField } from "@/lib/acoustics";

/** The columns of a batch's Thiele–Small CSV, with the names people also use for them. */
const COLUMNS = {
  serial: ["serial", "unit", "sn", "maker serial", "maker_serial"],
  fsHz: ["fs", "fs_hz", "fs (hz)"],
  qts: ["qts"],
  qes: ["qes"],
  qms: ["qms"],
  reOhm: ["re", "re_ohm", "re (ohm)", "re (ω)"],
  vasL: ["vas", "vas_l", "vas (l)"],
  sensitivityDb: ["sensitivity", "spl", "sensitivity_db", "sensitivity (db)"],
} as const;
type Column = keyof typeof COLUMNS;
type ValueColumn = Exclude<Column, "serial">;
const VALUE_COLUMNS: readonly ValueColumn[] = ["fsHz", "qts", "qes", "qms", "reOhm", "vasL", "sensitivityDb"];
/** The Thiele–Small field each column holds, for its label in messages ("Fs", "Re"). */
const FIELD_OF: Record<ValueColumn, TsField> = { fsHz: "fs", qts: "qts", qes: "qes", qms: "qms", reOhm: "re", vasL: "vas", sensitivityDb: "sensitivity" };
const labelOf = (c: ValueColumn) => TS_FIELDS.find((f) => f.key === FIELD_OF[c])?.label ?? c;

import { TS_CSV_TEMPLATE } from "./ts-csv-template";
export { TS_CSV_TEMPLATE };
/** Rows one file may bring in: a large batch, with room to spare. */
export const TS_CSV_MAX_ROWS = 1000;

export interface TsCsvRow {
  line: number;
  serial: string;
  ts: { fsHz: number | null; qts: number | null; qes: number | null; qms: number | null; reOhm: number | null; vasL: number | null; sensitivityDb: number | null };
  /** What is wrong with the row as written (a cell that is not a number, a serial given twice); the values that did read are in `ts`. */
  problems: string[];
}

export interface TsCsvRead {
  /** Problems of the file as a whole (its columns, its size), each naming its line. */
  fileProblems: string[];
  /** Every row, with its own problems, so each can still be checked against the register. Empty when the file cannot be read row by row. */
  rows: TsCsvRow[];
}

/**
 * Reads a pasted or uploaded CSV of Thiele–Small parameters (one row per unit, by Twinleaf or maker
 * serial). Comma, semicolon or tab separated; a decimal comma is read when the separator is not a
 * comma. Reads as much as it can: every row, with what is wrong with each cell, so that a caller
 * can report every problem of the file at once (see importTsCsv in ./units). Rows are only left
 * out when the file has no serial column or too many rows.
 */
export function readTsCsv(text: string): TsCsvRead {
  const clean = text.replace(/^\uFEFF/, "");
  if (!clean.trim()) return { fileProblems: ["The CSV is empty."], rows: [] };
  const parsed = Papa.parse<string[]>(clean, { skipEmptyLines: "greedy", delimiter: "" });
  const delimiter = parsed.meta.delimiter;
  const [header, ...body] = parsed.data;
  if (!header) return { fileProblems: ["The CSV is empty."], rows: [] };
  // Papaparse drops empty lines; count lines from the raw text to name them.
  const lineOf = lineNumbers(clean);
  const fileProblems: string[] = [];
  for (const e of parsed.errors) fileProblems.push(`Line ${lineOf[e.row ?? 0] ?? "?"}: ${e.message}.`);
  const index = new Map<Column, number>();
  header.forEach((h, i) => {
    const name = h.trim().toLowerCase();
    const col = (Object.keys(COLUMNS) as Column[]).find((c) => (COLUMNS[c] as readonly string[]).includes(name));
    if (!col) fileProblems.push(`Line 1: unknown column "${h.trim()}"; the columns are ${TS_CSV_TEMPLATE.trim()}.`);
    else if (index.has(col)) fileProblems.push(`Line 1: column "${h.trim()}" appears twice.`);
    else index.set(col, i);
  });
  if (!index.has("serial")) return { fileProblems: [...fileProblems, "Line 1: a serial column is needed to know which unit each row is for."], rows: [] };
  if (body.length > TS_CSV_MAX_ROWS) return { fileProblems: [...fileProblems, `At most ${TS_CSV_MAX_ROWS.toLocaleString("en-GB")} rows at once; this file has ${body.length.toLocaleString("en-GB")}. Split it and bring the parts in one after the other.`], rows: [] };

  const rows: TsCsvRow[] = [];
  const seen = new Map<string, number>();
  body.forEach((cells, i) => {
    const line = lineOf[i + 1] ?? i + 2;
    const cell = (c: Column) => (index.has(c) ? (cells[index.get(c)!] ?? "").trim() : "");
    const serial = cell("serial");
    const problems: string[] = [];
    if (!serial) problems.push("no serial: give the unit's Twinleaf serial or the maker's.");
    else if (seen.has(serial.toUpperCase())) problems.push(`${serial} already has a row (line ${seen.get(serial.toUpperCase())}).`);
    else seen.set(serial.toUpperCase(), line);
    const ts = {} as TsCsvRow["ts"];
    for (const c of VALUE_COLUMNS) {
      const raw = cell(c);
      ts[c] = null;
      if (!raw) continue;
      const value = Number(delimiter === "," ? raw : raw.replace(",", "."));
      if (Number.isFinite(value)) ts[c] = value;
      else problems.push(`${labelOf(c)} "${raw}" is not a number.`);
    }
    rows.push({ line, serial, ts, problems });
  });
  return { fileProblems, rows };
}

/** The text line of each non-empty record (1-based), so problems name the line people see. */
function lineNumbers(text: string): number[] {
  const out: number[] = [];
  text.split(/\r?\n/).forEach((l, i) => {
    if (l.trim()) out.push(i + 1);
  });
  return out;
}
