import { readFileSync } from "node:fs";

/**
 * The one clock the route's hold and cure rules read. In production it is the system's. Tests set
 * it: unit and integration tests with `setClock`, and the browser tests (which run the app in
 * another process) by writing an ISO time or an offset in milliseconds ("+86400000") to the file
 * named by TWINLEAF_CLOCK_FILE, which only their server is started with.
 */
let fixed: Date | null = null;

export function setClock(at: Date | null): void {
  fixed = at;
}

export function now(): Date {
  if (fixed) return new Date(fixed);
  const file = process.env.TWINLEAF_CLOCK_FILE;
  if (file) {
    try {
      const text = readFileSync(file, "utf8").trim();
      if (/^[+-]\d+$/.test(text)) return new Date(Date.now() + Number(text));
      const at = Date.parse(text);
      if (!Number.isNaN(at)) return new Date(at);
    } catch {
      // No file yet: the system clock.
    }
  }
  return new Date();
}
