import type { Limit } from "@/lib/limits";
import { waitMs } from "@/lib/limits/window";

/**
 * Sign-in throttling. Failures are counted per account (the e-mail typed, known or not, so the
 * answer never tells whether an account exists) since its last success, and per client address.
 */
export interface ThrottlePolicy {
  windowMs: number;
  maxFailuresPerAccount: number;
  maxFailuresPerAddress: number;
}

export const THROTTLE: ThrottlePolicy = {
  windowMs: 15 * 60 * 1000,
  maxFailuresPerAccount: 5,
  maxFailuresPerAddress: 20,
};

export interface AttemptCounts {
  /** Times of failures for this e-mail since its last success, inside the window. */
  accountFailures: Date[];
  /** Times of failures from this address inside the window. */
  addressFailures: Date[];
}

/** Milliseconds until the next try is allowed, or 0 when a try is allowed now. */
export function retryAfterMs(counts: AttemptCounts, now: Date, policy: ThrottlePolicy = THROTTLE): number {
  const t = now.getTime();
  const times = (dates: Date[]) => dates.map((d) => d.getTime());
  return Math.max(
    waitMs(times(counts.accountFailures), { windowMs: policy.windowMs, max: policy.maxFailuresPerAccount }, t),
    waitMs(times(counts.addressFailures), { windowMs: policy.windowMs, max: policy.maxFailuresPerAddress }, t),
  );
}

/** The two limits one sign-in try counts under (lib/limits keys). */
export function signInLimits(email: string, address: string, policy: ThrottlePolicy = THROTTLE): Limit[] {
  return [
    { key: `sign-in:account:${email}`, windowMs: policy.windowMs, max: policy.maxFailuresPerAccount, sinceSuccess: true },
    { key: `sign-in:address:${address}`, windowMs: policy.windowMs, max: policy.maxFailuresPerAddress },
  ];
}

export function normaliseEmail(email: string): string {
  return email.trim().toLowerCase();
}
