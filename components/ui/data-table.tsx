"use client";
import { useMemo, useState, type ReactNode } from "react";
import { cx } from "./cx";
import { TD, TH, TR, Table } from "./table";

export interface Column {
  key: string;
  label: string;
  numeric?: boolean;
  /** False for columns such as buttons that have nothing to sort by. */
  sortable?: boolean;
  /** Classes for the column's cells, e.g. a least width so a narrow screen scrolls the table rather than squeezing it. */
  cellClassName?: string;
}

export interface Cell {
  /** What sorting compares. */
  value: string | number | null;
  /** What is shown; the value when absent. */
  display?: ReactNode;
}

export interface Row {
  id: string;
  cells: Record<string, Cell>;
}

/** A table whose column headers sort it (click again to reverse), announced with aria-sort. */
export function DataTable({ columns, rows, caption, empty = "Nothing here yet.", initialSort, testId }: {
  columns: Column[];
  rows: Row[];
  caption: string;
  empty?: ReactNode;
  initialSort?: { key: string; dir: "asc" | "desc" };
  testId?: string;
}) {
  const [sort, setSort] = useState(initialSort ?? null);
  const sorted = useMemo(() => {
    if (!sort) return rows;
    const factor = sort.dir === "asc" ? 1 : -1;
    return [...rows].sort((a, b) => {
      const x = a.cells[sort.key]?.value ?? null;
      const y = b.cells[sort.key]?.value ?? null;
      if (x === y) return 0;
      if (x === null) return 1;
      if (y === null) return -1;
      return (typeof x === "number" && typeof y === "number" ? x - y : String(x).localeCompare(String(y), undefined, { numeric: true })) * factor;
    });
  }, [rows, sort]);

  return (
    <Table data-testid={testId}>
      <caption className="sr-only">{caption}</caption>
      <thead>
        <tr>
          {columns.map((c) => {
            const active = sort?.key === c.key;
            return (
              <TH key={c.key} aria-sort={active ? (sort!.dir === "asc" ? "ascending" : "descending") : undefined} className={c.numeric ? "text-right" : undefined}>
                {c.sortable === false ? (
                  c.label
                ) : (
                  <button
                    type="button"
                    className="inline-flex min-h-10 items-center gap-1 font-bold hover:text-ink"
                    onClick={() => setSort({ key: c.key, dir: active && sort!.dir === "asc" ? "desc" : "asc" })}
                  >
                    {c.label}
                    <span aria-hidden="true" className={cx("text-xs", !active && "opacity-30")}>
                      {active && sort!.dir === "desc" ? "▼" : "▲"}
                    </span>
                  </button>
                )}
              </TH>
            );
          })}
        </tr>
      </thead>
      <tbody>
        {sorted.length === 0 ? (
          <tr>
            <TD colSpan={columns.length} className="py-6 text-center text-ink-soft">
              {empty}
            </TD>
          </tr>
        ) : (
          sorted.map((r) => (
            <TR key={r.id}>
              {columns.map((c) => (
                <TD key={c.key} className={cx(c.numeric && "text-right tabular-nums", c.cellClassName)}>
                  {r.cells[c.key]?.display ?? r.cells[c.key]?.value ?? ""}
                </TD>
              ))}
            </TR>
          ))
        )}
      </tbody>
    </Table>
  );
}
