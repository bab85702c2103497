import "server-only";
import { and, desc, eq, gt } from "drizzle-orm";
import type { Db } from "@/db";
import { signInAttempts, users } from "@/db/schema";
import { appendEvent } from "@/lib/events/queries";
import { dummyPasswordHash, verifyPassword } from "./password";
import { normaliseEmail, retryAfterMs, THROTTLE } from "./throttle";

export const SIGN_IN_REFUSED = "That e-mail and password do not match an active account.";

export type SignInResult =
  | { ok: true; userId: string }
  | { ok: false; reason: "invalid"; message: string }
  | { ok: false; reason: "throttled"; message: string; retryAfterSeconds: number };

export function throttledMessage(seconds: number): string {
  const minutes = Math.max(1, Math.ceil(seconds / 60));
  return `Too many tries. Wait ${minutes} minute${minutes === 1 ? "" : "s"}, then try again.`;
}

async function failuresSince(db: Db, email: string, address: string, now: Date) {
  const windowStart = new Date(now.getTime() - THROTTLE.windowMs);
  const [lastOk] = await db
    .select({ at: signInAttempts.at })
    .from(signInAttempts)
    .where(and(eq(signInAttempts.email, email), eq(signInAttempts.ok, true)))
    .orderBy(desc(signInAttempts.at))
    .limit(1);
  const accountFrom = lastOk && lastOk.at > windowStart ? lastOk.at : windowStart;
  const account = await db
    .select({ at: signInAttempts.at })
    .from(signInAttempts)
    .where(and(eq(signInAttempts.email, email), eq(signInAttempts.ok, false), gt(signInAttempts.at, accountFrom)));
  const byAddress = await db
    .select({ at: signInAttempts.at })
    .from(signInAttempts)
    .where(and(eq(signInAttempts.address, address), eq(signInAttempts.ok, false), gt(signInAttempts.at, windowStart)));
  return { accountFailures: account.map((r) => r.at), addressFailures: byAddress.map((r) => r.at) };
}

/**
 * Checks an e-mail and password. An unknown e-mail, a wrong password and a deactivated account
 * all get the same answer after the same work (a hash is verified in every case).
 */
export async function signIn(db: Db, input: { email: string; password: string; address: string; now?: Date }): Promise<SignInResult> {
  const now = input.now ?? new Date();
  const email = normaliseEmail(input.email);
  const address = input.address || "unknown";

  const wait = retryAfterMs(await failuresSince(db, email, address, now), now);
  if (wait > 0) {
    const seconds = Math.ceil(wait / 1000);
    return { ok: false, reason: "throttled", retryAfterSeconds: seconds, message: throttledMessage(seconds) };
  }

  const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  const usable = user && user.active && user.passwordHash;
  const matches = await verifyPassword(usable ? user.passwordHash! : await dummyPasswordHash(), input.password);
  const ok = Boolean(usable && matches);

  await db.transaction(async (tx) => {
    await tx.insert(signInAttempts).values({ email, address, ok, at: now });
    if (ok) {
      await appendEvent(tx, { actorId: user!.id, station: "sign-in", type: "user.signed_in", subjectKind: "user", subjectId: user!.id, data: { email } });
    }
  });
  return ok ? { ok: true, userId: user!.id } : { ok: false, reason: "invalid", message: SIGN_IN_REFUSED };
}
