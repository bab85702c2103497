import { describe, expect, test } from "vitest";
import { normaliseEmail, retryAfterMs, THROTTLE } from "@/lib/auth/throttle";

const MIN = 60_000;
const NOW = new Date("2025-03-03T08:00:00.000Z");
/** Failures at these many minutes before NOW. */
const ago = (...minutes: number[]) => minutes.map((m) => new Date(NOW.getTime() - m * MIN));
/** `n` failures evenly spread from `oldest` minutes ago towards now (the newest oldest/n minutes ago). */
const spread = (n: number, oldest: number) => ago(...Array.from({ length: n }, (_, i) => oldest * (1 - i / n)));
/** `n` failures one minute apart, the newest `newest` minutes ago. */
const minutely = (n: number, newest: number) => ago(...Array.from({ length: n }, (_, i) => newest + n - 1 - i));

describe("the policy", () => {
  // The numbers the brief fixes: 15 minutes, 5 per account, 20 per address.
  test("is 5 failures per account and 20 per address in a 15-minute window", () => {
    expect(THROTTLE).toEqual({ windowMs: 15 * MIN, maxFailuresPerAccount: 5, maxFailuresPerAddress: 20 });
  });
});

describe("retryAfterMs", () => {
  // Expected wait = (oldest of the newest `max` failures) + 15 min − now, worked out by hand.
  test.each<[string, Date[], Date[], number]>([
    ["no failures at all", [], [], 0],
    ["4 account failures: under the limit", spread(4, 10), [], 0],
    ["19 address failures: under the limit", [], spread(19, 14), 0],
    ["5 account failures, oldest 10 min ago: wait 5 min", spread(5, 10), [], 5 * MIN],
    ["5 account failures, oldest 1 min ago: wait 14 min", spread(5, 1), [], 14 * MIN],
    ["5 account failures given newest first: order does not matter", spread(5, 10).reverse(), [], 5 * MIN],
    ["7 account failures (10…4 min ago): the newest 5 count, oldest of those 8 min ago", minutely(7, 4), [], 7 * MIN],
    ["20 address failures, oldest 12 min ago: wait 3 min", [], spread(20, 12), 3 * MIN],
    ["account and address both over: the longer wait wins", spread(5, 14), spread(20, 12), 3 * MIN],
    ["account over, address under: the account's wait", spread(5, 6), spread(19, 14), 9 * MIN],
    ["address over, account under: the address's wait", spread(4, 14), spread(20, 5), 10 * MIN],
    ["oldest counted failure exactly 15 min ago: it has left the window", ago(15, 4, 3, 2, 1), [], 0],
    ["oldest counted failure 1 ms short of 15 min: wait 1 ms", [new Date(NOW.getTime() - 15 * MIN + 1), ...ago(4, 3, 2, 1)], [], 1],
    ["5 old failures (20…16 min ago), all outside the window", minutely(5, 16), [], 0],
    ["6 failures, one outside the window: the 5 inside still throttle", ago(16, 10, 8, 6, 4, 2), [], 5 * MIN],
    ["20 address failures (40…21 min ago), all outside the window", [], minutely(20, 21), 0],
  ])("%s", (_label, accountFailures, addressFailures, expected) => {
    expect(retryAfterMs({ accountFailures, addressFailures }, NOW)).toBe(expected);
  });

  test("a policy passed in replaces the default", () => {
    const policy = { windowMs: MIN, maxFailuresPerAccount: 2, maxFailuresPerAddress: 3 } as const;
    // Two failures 30 s and 10 s ago: the older leaves a 1-minute window in 30 s.
    const two = [new Date(NOW.getTime() - 30_000), new Date(NOW.getTime() - 10_000)];
    expect(retryAfterMs({ accountFailures: two, addressFailures: [] }, NOW, policy)).toBe(30_000);
    expect(retryAfterMs({ accountFailures: [], addressFailures: two }, NOW, policy)).toBe(0);
    expect(retryAfterMs({ accountFailures: two, addressFailures: [] }, NOW)).toBe(0);
  });
});

describe("normaliseEmail", () => {
  // The account counter is keyed by the normalised e-mail, so case or spaces cannot dodge it.
  test.each([
    ["Wren@Workshop.TEST", "wren@workshop.test"],
    ["  wren@workshop.test\t", "wren@workshop.test"],
    ["wren@workshop.test", "wren@workshop.test"],
  ])("%j → %j", (input, expected) => {
    expect(normaliseEmail(input)).toBe(expected);
  });
});
