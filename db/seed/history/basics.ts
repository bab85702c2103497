/** Seeded randomness and workshop dates for the invented history. Demo data only, never a check. */

export const MIN = 60_000;
export const HOUR = 60 * MIN;
export const DAY = 24 * HOUR;

/** mulberry32: small, fast and good enough for invented data; the same seed gives the same history. */
export class Rng {
  private a: number;
  constructor(seed: number) {
    this.a = seed >>> 0;
  }
  float(): number {
    this.a = (this.a + 0x6d2b79f5) >>> 0;
    let t = this.a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  }
  /** Integer in [lo, hi]. */
  int(lo: number, hi: number): number {
    return lo + Math.floor(this.float() * (hi - lo + 1));
  }
  chance(p: number): boolean {
    return this.float() < p;
  }
  pick<T>(xs: readonly T[]): T {
    return xs[Math.floor(this.float() * xs.length)]!;
  }
  weighted<T>(xs: readonly T[], weight: (x: T) => number): T {
    const total = xs.reduce((s, x) => s + weight(x), 0);
    let r = this.float() * total;
    for (const x of xs) {
      r -= weight(x);
      if (r < 0) return x;
    }
    return xs[xs.length - 1]!;
  }
  /** Standard normal (Box–Muller). */
  gauss(): number {
    return Math.sqrt(-2 * Math.log(1 - this.float())) * Math.cos(2 * Math.PI * this.float());
  }
  /** A generator of its own, drawn from this one, so a stage's draws never shift another's. */
  fork(): Rng {
    return new Rng(Math.floor(this.float() * 2 ** 32));
  }
}

export const plus = (d: Date, ms: number) => new Date(d.getTime() + ms);

/**
 * `days` after `d` (before it when negative), at `hour` UTC, moved off a weekend: the workshop
 * works Monday to Friday. A day planned back from a later one moves to the Friday before, so it
 * cannot overtake the step it prepares.
 */
export function workday(d: Date, days: number, hour: number): Date {
  const out = new Date(d.getTime() + days * DAY);
  out.setUTCHours(hour, 0, 0, 0);
  const dow = out.getUTCDay();
  if (dow === 6) out.setUTCDate(out.getUTCDate() + (days < 0 ? -1 : 2));
  if (dow === 0) out.setUTCDate(out.getUTCDate() + (days < 0 ? -2 : 1));
  return out;
}

/** The calendar day of `d` in UTC, YYYY-MM-DD (intake dates; serials take their year from it). */
export const utcDay = (d: Date) => d.toISOString().slice(0, 10);

export const yymm = (d: Date) => `${String(d.getUTCFullYear() % 100).padStart(2, "0")}${String(d.getUTCMonth() + 1).padStart(2, "0")}`;

export const round = (x: number, digits: number) => Math.round(x * 10 ** digits) / 10 ** digits;
