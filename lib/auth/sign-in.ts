import "server-only";
import { eq } from "drizzle-orm";
import type { Db } from "@/db";
import { users } from "@/db/schema";
import { appendEvent } from "@/lib/events/queries";
import { reserve, settle } from "@/lib/limits";
import { dummyPasswordHash, verifyPassword } from "./password";
import { normaliseEmail, signInLimits } from "./throttle";

export const SIGN_IN_REFUSED = "That e-mail and password do not match an active account.";

export type SignInResult =
  | { ok: true; userId: string }
  | { ok: false; reason: "invalid"; message: string }
  | { ok: false; reason: "throttled"; message: string; retryAfterSeconds: number };

export function throttledMessage(seconds: number): string {
  const minutes = Math.max(1, Math.ceil(seconds / 60));
  return `Too many tries. Wait ${minutes} minute${minutes === 1 ? "" : "s"}, then try again.`;
}

/**
 * Checks an e-mail and password. An unknown e-mail, a wrong password and a deactivated account
 * all get the same answer after the same work (a hash is verified in every case).
 *
 * The try is reserved (counted as a failure) before the password is verified, in one write
 * transaction with the check of the limit, so tries sent at once cannot all be verified: at most
 * the limit's number are, and the right password among them is refused once the limit is full.
 */
export async function signIn(db: Db, input: { email: string; password: string; address: string; now?: Date }): Promise<SignInResult> {
  const now = input.now ?? new Date();
  const email = normaliseEmail(input.email);
  const address = input.address || "unknown";

  const reserved = await reserve(db, signInLimits(email, address), { now });
  if (!reserved.ok) {
    const seconds = Math.ceil(reserved.retryAfterMs / 1000);
    return { ok: false, reason: "throttled", retryAfterSeconds: seconds, message: throttledMessage(seconds) };
  }

  // If anything below throws, the reservation stays pending and counts as a failure.
  const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  const usable = user && user.active && user.passwordHash;
  const matches = await verifyPassword(usable ? user.passwordHash! : await dummyPasswordHash(), input.password);
  if (!user || !usable || !matches) {
    await db.transaction((tx) => settle(tx, reserved.attempt, "counted"));
    return { ok: false, reason: "invalid", message: SIGN_IN_REFUSED };
  }
  await db.transaction(async (tx) => {
    await settle(tx, reserved.attempt, "success");
    await appendEvent(tx, { actorId: user.id, station: "sign-in", type: "user.signed_in", subjectKind: "user", subjectId: user.id, data: { email } });
  });
  return { ok: true, userId: user.id };
}
