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
  const wait = (failures: Date[], max: number): number => {
    if (failures.length < max) return 0;
    const sorted = failures.map((d) => d.getTime()).sort((a, b) => a - b);
    // The try that would be allowed again is when the oldest counted failure leaves the window.
    const oldestCounted = sorted[sorted.length - max]!;
    return Math.max(0, oldestCounted + policy.windowMs - now.getTime());
  };
  return Math.max(wait(counts.accountFailures, policy.maxFailuresPerAccount), wait(counts.addressFailures, policy.maxFailuresPerAddress));
}

export function normaliseEmail(email: string): string {
  return email.trim().toLowerCase();
}
