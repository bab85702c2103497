import Papa from "papaparse";

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

export const TS_CSV_TEMPLATE = "serial,fs,qts,qes,qms,re,vas,sensitivity\n";

export interface TsCsvRow {
  line: number;
  serial: string;
  ts: { fsHz: number | null; qts: number | null; qes: number | null; qms: number | null; reOhm: number | null; vasL: number | null; sensitivityDb: number | null };
}

/**
 * Reads a pasted or uploaded CSV of Thiele–Small parameters (one row per unit, by Twinleaf or maker
 * serial). Comma, semicolon or tab separated; a decimal comma is read when the separator is not a comma.
 * Returns every row, or every problem with its line: nothing is used from a file with a problem.
 */
export function parseTsCsv(text: string): { ok: true; rows: TsCsvRow[] } | { ok: false; errors: string[] } {
  const clean = text.replace(/^\uFEFF/, "");
  if (!clean.trim()) return { ok: false, errors: ["The CSV is empty."] };
  const parsed = Papa.parse<string[]>(clean, { skipEmptyLines: "greedy", delimiter: "" });
  const delimiter = parsed.meta.delimiter;
  const [header, ...body] = parsed.data;
  if (!header) return { ok: false, errors: ["The CSV is empty."] };
  const errors: string[] = [];
  const index = new Map<Column, number>();
  header.forEach((h, i) => {
    const name = h.trim().toLowerCase();
    const col = (Object.keys(COLUMNS) as Column[]).find((c) => (COLUMNS[c] as readonly string[]).includes(name));
    if (!col) errors.push(`Line 1: unknown column "${h.trim()}"; the columns are ${TS_CSV_TEMPLATE.trim()}.`);
    else if (index.has(col)) errors.push(`Line 1: column "${h.trim()}" appears twice.`);
    else index.set(col, i);
  });
  if (!index.has("serial")) errors.push("Line 1: a serial column is needed to know which unit each row is for.");
  if (errors.length) return { ok: false, errors };
  const rows: TsCsvRow[] = [];
  const seen = new Map<string, number>();
  // Papaparse drops empty lines; count lines from the raw text to name them.
  const lineOf = lineNumbers(clean);
  body.forEach((cells, i) => {
    const line = lineOf[i + 1] ?? i + 2;
    const cell = (c: Column) => (index.has(c) ? (cells[index.get(c)!] ?? "").trim() : "");
    const serial = cell("serial");
    if (!serial) {
      errors.push(`Line ${line}: no serial.`);
      return;
    }
    if (seen.has(serial.toUpperCase())) {
      errors.push(`Line ${line}: ${serial} already has a row (line ${seen.get(serial.toUpperCase())}).`);
      return;
    }
    seen.set(serial.toUpperCase(), line);
    const ts = {} as TsCsvRow["ts"];
    for (const c of ["fsHz", "qts", "qes", "qms", "reOhm", "vasL", "sensitivityDb"] as const) {
      const raw = cell(c);
      if (!raw) {
        ts[c] = null;
        continue;
      }
      const value = Number(delimiter === "," ? raw : raw.replace(",", "."));
      if (!Number.isFinite(value)) {
        errors.push(`Line ${line}: ${c === "fsHz" ? "fs" : c === "reOhm" ? "re" : c === "vasL" ? "vas" : c === "sensitivityDb" ? "sensitivity" : c} "${raw}" is not a number.`);
        ts[c] = null;
      } else ts[c] = value;
    }
    rows.push({ line, serial, ts });
  });
  if (rows.length > 1000) errors.push("At most 1,000 rows at once.");
  return errors.length ? { ok: false, errors } : { ok: true, rows };
}

/** The text line of each non-empty record (1-based), so errors name the line people see. */
function lineNumbers(text: string): number[] {
  const out: number[] = [];
  text.split(/\r?\n/).forEach((l, i) => {
    if (l.trim()) out.push(i + 1);
  });
  return out;
}
