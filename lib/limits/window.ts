/**
 * The sliding window every limit uses, as plain arithmetic (no database), so it can be checked
 * against hand-worked cases.
 */
export interface WindowPolicy {
  /** How far back tries count, in milliseconds. */
  windowMs: number;
  /** Tries allowed inside the window. */
  max: number;
}

/**
 * Milliseconds until one more try is allowed, given the times (ms) of the tries that count; 0 when
 * one is allowed now. The next try is allowed when the oldest of the last `max` leaves the window.
 */
export function waitMs(times: readonly number[], policy: WindowPolicy, now: number): number {
  const inside = times.filter((t) => t > now - policy.windowMs).sort((a, b) => a - b);
  if (inside.length < policy.max) return 0;
  if (policy.max <= 0) return policy.windowMs;
  const oldestCounted = inside[inside.length - policy.max]!;
  return Math.max(1, oldestCounted + policy.windowMs - now);
}
