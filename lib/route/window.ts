/**
 * A time window typed by a person or sent as JSON: each end a workshop day (YYYY-MM-DD, the whole
 * day in the workshop's zone) or an instant with its zone (2026-03-02T14:30:00Z). Pure: the
 * selection itself is in ./readings.ts.
 */
import { TZDate } from "@date-fns/tz";
import { isCalendarDate } from "@/lib/input/dates";
import { workshopDayEnd, workshopTimeZone } from "@/lib/workshop-time";

export type WindowAnswer = { ok: true; from: Date; to: Date } | { ok: false; field: "from" | "to"; message: string };

// An instant must say its zone (Z or ±hh:mm): a bare local time would silently read as UTC.
const INSTANT = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?(Z|[+-]\d{2}:\d{2})$/;

function readEnd(text: unknown, end: "from" | "to"): Date | string {
  if (text instanceof Date) return Number.isNaN(text.getTime()) ? "is not a date" : text;
  if (typeof text !== "string" || !text.trim()) return "is missing: give a date as YYYY-MM-DD, or a date and time such as 2026-03-02T14:30Z";
  const t = text.trim();
  if (isCalendarDate(t)) {
    const [y, m, d] = t.split("-").map(Number) as [number, number, number];
    const start = new Date(new TZDate(y, m - 1, d, workshopTimeZone()).getTime());
    return end === "from" ? start : workshopDayEnd(start);
  }
  if (INSTANT.test(t)) {
    const at = new Date(t);
    if (!Number.isNaN(at.getTime()) && isCalendarDate(t.slice(0, 10))) return at;
  }
  return `"${t.slice(0, 40)}" is not a date: give YYYY-MM-DD, or a date and time with its zone such as 2026-03-02T14:30Z`;
}

const END_WORD = { from: "The start", to: "The end" } as const;

/** Reads both ends; the end may equal the start, never come before it. */
export function readWindow(from: unknown, to: unknown): WindowAnswer {
  const a = readEnd(from, "from");
  if (typeof a === "string") return { ok: false, field: "from", message: `${END_WORD.from} ${a}.` };
  const b = readEnd(to, "to");
  if (typeof b === "string") return { ok: false, field: "to", message: `${END_WORD.to} ${b}.` };
  if (b < a) return { ok: false, field: "to", message: "The end of the window is before its start: nothing can fall inside it." };
  return { ok: true, from: a, to: b };
}
