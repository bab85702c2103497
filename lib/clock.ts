import { AsyncLocalStorage } from "node:async_hooks";
import { readFileSync } from "node:fs";

/**
 * The register's one clock: every time a write stamps (events, items, links, route records,
 * measurements, sets, certificates, cartons…) and every hold or cure rule reads it. In production
 * it is the system's. Tests set it: unit and integration tests with `setClock`, and the browser
 * tests (which run the app in another process) by writing an ISO time or an offset in milliseconds
 * ("+86400000") to the file named by TWINLEAF_CLOCK_FILE, which only their server is started with.
 *
 * `atTime(at, fn)` stamps everything `fn` does with `at`, and nothing outside it: it is for
 * importing history (the demo seed writes its invented years through the domain's own functions).
 * The application never calls it; a request's time always comes from this clock.
 */
let fixed: Date | null = null;
const scoped = new AsyncLocalStorage<Date>();

export function setClock(at: Date | null): void {
  fixed = at;
}

/** Runs `fn` with the clock reading `at` inside it (and in everything it awaits), whatever the clock says outside. */
export function atTime<T>(at: Date, fn: () => Promise<T>): Promise<T> {
  if (!(at instanceof Date) || Number.isNaN(at.getTime())) throw new Error("atTime needs a valid date");
  return scoped.run(new Date(at), fn);
}

export function now(): Date {
  const at = scoped.getStore();
  if (at) return new Date(at);
  if (fixed) return new Date(fixed);
  const file = process.env.TWINLEAF_CLOCK_FILE;
  if (file) {
    try {
      const text = readFileSync(file, "utf8").trim();
      if (/^[+-]\d+$/.test(text)) return new Date(Date.now() + Number(text));
      const parsed = Date.parse(text);
      if (!Number.isNaN(parsed)) return new Date(parsed);
    } catch {
      // No file yet: the system clock.
    }
  }
  return new Date();
}
