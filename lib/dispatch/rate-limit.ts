/**
 * A sliding-window limiter for the public certificate check, kept in this process's memory.
 *
 * Why in memory: sign-in throttling has its own table (sign_in_attempts: e-mail, address, ok), and
 * writing certificate checks there would count them against sign-in. A table of its own would
 * need a migration, which is the lead's to add; until then the counts live here. That is enough
 * for one `next start` process: a restart forgets the counts (an owner is never locked out for
 * long), and several processes would each allow the limit.
 */
export interface RateLimitPolicy {
  windowMs: number;
  max: number;
}

/** 30 checks per address per 10 minutes: far more than an owner scanning a QR code needs. */
export const VERIFY_LIMIT: RateLimitPolicy = { windowMs: 10 * 60_000, max: 30 };

/** Addresses kept at most; past it the stalest are forgotten first, so memory stays bounded. */
const MAX_KEYS = 10_000;

export interface RateLimiter {
  /** Counts one request from `key` at `now`; false when it is over the limit (and is not counted). */
  hit(key: string, now?: number): boolean;
  /** Milliseconds until `key` may try again; 0 when it may now. */
  retryAfterMs(key: string, now?: number): number;
}

export function createRateLimiter(policy: RateLimitPolicy): RateLimiter {
  const hits = new Map<string, number[]>();

  const recent = (key: string, now: number) => {
    const list = (hits.get(key) ?? []).filter((t) => t > now - policy.windowMs);
    if (list.length) hits.set(key, list);
    else hits.delete(key);
    return list;
  };

  return {
    hit(key, now = Date.now()) {
      const list = recent(key, now);
      if (list.length >= policy.max) return false;
      list.push(now);
      // Map keeps insertion order: re-inserting moves the key to the end, the oldest stay first.
      hits.delete(key);
      hits.set(key, list);
      while (hits.size > MAX_KEYS) hits.delete(hits.keys().next().value!);
      return true;
    },
    retryAfterMs(key, now = Date.now()) {
      const list = recent(key, now);
      if (list.length < policy.max) return 0;
      return Math.max(0, list[list.length - policy.max]! + policy.windowMs - now);
    },
  };
}

// One limiter per server process, kept across hot reloads in development.
const globalForLimit = globalThis as unknown as { twinleafVerifyLimiter?: RateLimiter };

export function verifyLimiter(): RateLimiter {
  return (globalForLimit.twinleafVerifyLimiter ??= createRateLimiter(VERIFY_LIMIT));
}
