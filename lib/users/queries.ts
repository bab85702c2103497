import "server-only";
import type { Actor } from "@/lib/vocabulary/actor";
import { and, asc, eq, gt, isNotNull, isNull, ne, sql } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db";
import { authTokens, sessions, userRoles, users } from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { hashPassword } from "@/lib/auth/password";
import type { Role } from "@/lib/auth/roles";
import { isRole, sortRoles } from "@/lib/auth/roles";
import { normaliseEmail } from "@/lib/auth/throttle";
import { reserve, type Limit } from "@/lib/limits";
import { hashToken, newId, newToken } from "@/lib/auth/tokens";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { queueMail } from "@/lib/mail/outbox";
import { inviteMail, resetMail } from "@/lib/mail/templates";

/** How long a link stays usable: an invitation may wait over a weekend, a reset link is asked for and used at once. */
export const INVITE_TTL_HOURS = 72;
export const RESET_TTL_MINUTES = 60;

/** The administrator making a change; their name goes into the invitation. */
export type NamedActor = Actor & { name: string };

export interface UserSummary {
  id: string;
  email: string;
  name: string;
  active: boolean;
  roles: Role[];
  status: "active" | "invited" | "deactivated";
  createdAt: Date;
}

export async function listUsers(db: DbOrTx, onlyId?: string): Promise<UserSummary[]> {
  const rows = await db
    .select({
      id: users.id,
      email: users.email,
      name: users.name,
      active: users.active,
      hasPassword: sql<number>`${users.passwordHash} IS NOT NULL`,
      createdAt: users.createdAt,
      roles: sql<string | null>`(SELECT group_concat(${userRoles.role}) FROM ${userRoles} WHERE ${userRoles.userId} = ${users.id})`,
    })
    .from(users)
    .where(onlyId ? eq(users.id, onlyId) : undefined)
    .orderBy(asc(users.name));
  return rows.map((r) => ({
    id: r.id,
    email: r.email,
    name: r.name,
    active: r.active,
    createdAt: r.createdAt,
    roles: sortRoles((r.roles ?? "").split(",").filter(isRole)),
    status: !r.active ? "deactivated" : r.hasPassword ? "active" : "invited",
  }));
}

export async function getUserSummary(db: DbOrTx, userId: string): Promise<UserSummary | null> {
  return (await listUsers(db, userId))[0] ?? null;
}

async function countActiveAdmins(db: DbOrTx, exceptUserId?: string): Promise<number> {
  const [row] = await db
    .select({ n: sql<number>`count(*)` })
    .from(users)
    .innerJoin(userRoles, and(eq(userRoles.userId, users.id), eq(userRoles.role, "admin")))
    // An invited admin who has not yet chosen a password cannot administer, so does not count.
    .where(and(eq(users.active, true), isNotNull(users.passwordHash), exceptUserId ? sql`${users.id} <> ${exceptUserId}` : undefined));
  return Number(row?.n ?? 0);
}

/** Revokes every link of the user still open (unused, unrevoked), but `except`; returns how many. */
async function revokeOpenTokens(tx: DbOrTx, userId: string, except?: string): Promise<number> {
  const revoked = await tx
    .update(authTokens)
    .set({ revokedAt: now() })
    .where(and(eq(authTokens.userId, userId), isNull(authTokens.usedAt), isNull(authTokens.revokedAt), except ? ne(authTokens.id, except) : undefined))
    .returning({ id: authTokens.id });
  return revoked.length;
}

/**
 * Makes a one-time token and stores its hash. The raw token goes only into the mail, as a secret
 * of queueMail, so the outbox never keeps it. Older links of the user stop working.
 */
async function issueToken(tx: DbOrTx, userId: string, purpose: "invite" | "reset", ttlMs: number) {
  await revokeOpenTokens(tx, userId);
  const token = newToken();
  const expiresAt = new Date(now().getTime() + ttlMs);
  await tx.insert(authTokens).values({ id: newId(), userId, purpose, tokenHash: hashToken(token), expiresAt, createdAt: now() });
  return { token, expiresAt };
}

/** Invites a new user: the user, their roles, a one-time link, the event and the e-mail, in one transaction. */
export async function inviteUser(
  db: Db,
  input: { email: string; name: string; roles: Role[]; actor: NamedActor; baseUrl: string },
): Promise<{ userId: string }> {
  const email = normaliseEmail(input.email);
  const userId = newId();
  try {
    await db.transaction(async (tx) => {
      await tx.insert(users).values({ id: userId, email, name: input.name.trim() });
      if (input.roles.length) await tx.insert(userRoles).values(input.roles.map((role) => ({ userId, role })));
      const { token } = await issueToken(tx, userId, "invite", INVITE_TTL_HOURS * 3600_000);
      const eventId = await appendEvent(tx, {
        actorId: input.actor.id,
        station: "admin",
        type: "user.invited",
        subjectKind: "user",
        subjectId: userId,
        data: { email, roles: input.roles },
      });
      const mail = inviteMail({
        name: input.name.trim(),
        link: `${input.baseUrl}/invite/${token}`,
        invitedBy: input.actor.name,
        expiresHours: INVITE_TTL_HOURS,
      });
      await queueMail(tx, { to: email, ...mail, eventId, secrets: [token] });
    });
  } catch (e) {
    if (isConstraintError(e, "UNIQUE")) {
      throw new AppError(409, "Someone with that e-mail is already registered.", { email: ["Someone with that e-mail is already registered."] });
    }
    throw e;
  }
  return { userId };
}

async function requireUser(db: DbOrTx, userId: string) {
  const [user] = await db.select().from(users).where(eq(users.id, userId)).limit(1);
  if (!user) throw new AppError(404, "No such user.");
  return user;
}

/** Replaces a user's roles. Takes effect on their next request, because sessions read roles afresh. */
export async function setRoles(db: Db, input: { userId: string; roles: Role[]; actor: NamedActor; reason?: string }): Promise<void> {
  await db.transaction(async (tx) => {
    const user = await requireUser(tx, input.userId);
    const before = (await tx.select({ role: userRoles.role }).from(userRoles).where(eq(userRoles.userId, user.id))).map((r) => r.role).sort();
    const after = [...new Set(input.roles)].sort();
    if (before.join() === after.join()) return;
    if (before.includes("admin") && !after.includes("admin") && user.active && (await countActiveAdmins(tx, user.id)) === 0) {
      throw new AppError(409, "This is the last active administrator: give another user the admin role first.");
    }
    await tx.delete(userRoles).where(eq(userRoles.userId, user.id));
    if (after.length) await tx.insert(userRoles).values(after.map((role) => ({ userId: user.id, role })));
    await appendEvent(tx, {
      actorId: input.actor.id,
      station: "admin",
      type: "user.roles_changed",
      subjectKind: "user",
      subjectId: user.id,
      data: { email: user.email, from: before, to: after },
      reason: input.reason ?? null,
    });
  });
}

/** Deactivates a user and ends every session they hold. */
export async function deactivateUser(db: Db, input: { userId: string; actor: NamedActor; reason?: string }): Promise<void> {
  if (input.userId === input.actor.id) throw new AppError(409, "You cannot deactivate yourself.");
  await db.transaction(async (tx) => {
    const user = await requireUser(tx, input.userId);
    if (!user.active) return;
    const roles = (await tx.select({ role: userRoles.role }).from(userRoles).where(eq(userRoles.userId, user.id))).map((r) => r.role);
    if (roles.includes("admin") && (await countActiveAdmins(tx, user.id)) === 0) {
      throw new AppError(409, "This is the last active administrator and cannot be deactivated.");
    }
    await tx.update(users).set({ active: false }).where(eq(users.id, user.id));
    const ended = await tx.delete(sessions).where(eq(sessions.userId, user.id)).returning({ id: sessions.id });
    // Links still open would come back to life on reactivation.
    await revokeOpenTokens(tx, user.id);
    await appendEvent(tx, {
      actorId: input.actor.id,
      station: "admin",
      type: "user.deactivated",
      subjectKind: "user",
      subjectId: user.id,
      data: { email: user.email, sessionsEnded: ended.length },
      reason: input.reason ?? null,
    });
  });
}

export async function reactivateUser(db: Db, input: { userId: string; actor: NamedActor }): Promise<void> {
  await db.transaction(async (tx) => {
    const user = await requireUser(tx, input.userId);
    if (user.active) return;
    await tx.update(users).set({ active: true }).where(eq(users.id, user.id));
    await appendEvent(tx, { actorId: input.actor.id, station: "admin", type: "user.reactivated", subjectKind: "user", subjectId: user.id, data: { email: user.email } });
  });
}

/** Finds a usable token: right purpose, not used, not revoked, not expired, owner active. */
export async function findToken(db: DbOrTx, token: string, purpose: "invite" | "reset") {
  const [row] = await db
    .select({ id: authTokens.id, userId: authTokens.userId, expiresAt: authTokens.expiresAt, name: users.name, email: users.email })
    .from(authTokens)
    .innerJoin(users, eq(users.id, authTokens.userId))
    .where(
      and(
        eq(authTokens.tokenHash, hashToken(token)),
        eq(authTokens.purpose, purpose),
        isNull(authTokens.usedAt),
        isNull(authTokens.revokedAt),
        gt(authTokens.expiresAt, now()),
        eq(users.active, true),
      ),
    )
    .limit(1);
  return row ?? null;
}

const TOKEN_GONE = "This link has expired or has already been used. Ask for a new one.";

/**
 * Spends a one-time token and sets the password. The conditional update makes a second use fail;
 * every other link of the user is revoked with it.
 */
async function spendToken(db: Db, token: string, purpose: "invite" | "reset", password: string, eventType: "user.joined" | "user.password_reset") {
  const passwordHash = await hashPassword(password); // hashed before the transaction: never slow work inside one
  return db.transaction(async (tx) => {
    const found = await findToken(tx, token, purpose);
    if (!found) throw new AppError(410, TOKEN_GONE);
    const spent = await tx
      .update(authTokens)
      .set({ usedAt: now() })
      .where(and(eq(authTokens.id, found.id), isNull(authTokens.usedAt), isNull(authTokens.revokedAt)))
      .returning({ id: authTokens.id });
    if (spent.length !== 1) throw new AppError(410, TOKEN_GONE);
    await revokeOpenTokens(tx, found.userId, found.id);
    await tx.update(users).set({ passwordHash }).where(eq(users.id, found.userId));
    // A new password ends every session that the old one opened.
    await tx.delete(sessions).where(eq(sessions.userId, found.userId));
    await appendEvent(tx, { actorId: found.userId, station: "sign-in", type: eventType, subjectKind: "user", subjectId: found.userId, data: { email: found.email } });
    return { userId: found.userId };
  });
}

export function acceptInvite(db: Db, input: { token: string; password: string }) {
  return spendToken(db, input.token, "invite", input.password, "user.joined");
}

export function resetPassword(db: Db, input: { token: string; password: string }) {
  return spendToken(db, input.token, "reset", input.password, "user.password_reset");
}

/** Reset links asked for: 3 per e-mail and 10 per client address an hour (lib/limits keys). */
export const RESET_REQUEST_LIMIT = { windowMs: 60 * 60_000, perEmail: 3, perAddress: 10 };

export function resetRequestLimits(email: string, address: string): Limit[] {
  const { windowMs, perEmail, perAddress } = RESET_REQUEST_LIMIT;
  return [
    { key: `reset:account:${email}`, windowMs, max: perEmail },
    { key: `reset:address:${address}`, windowMs, max: perAddress },
  ];
}

/**
 * Sends a reset link when the e-mail belongs to an active account with a password. The caller
 * answers the same whatever happens here, so the form never tells who has an account.
 */
export async function requestPasswordReset(db: Db, input: { email: string; baseUrl: string; address: string; now?: Date }): Promise<void> {
  const email = normaliseEmail(input.email);
  // Counted for every e-mail typed, known or not, before the account is looked up; over a limit
  // nothing is sent and the caller's answer is the same as ever.
  const allowed = await reserve(db, resetRequestLimits(email, input.address || "unknown"), { now: input.now, state: "counted" });
  if (!allowed.ok) return;
  const [user] = await db.select().from(users).where(eq(users.email, email)).limit(1);
  if (!user || !user.active || !user.passwordHash) return;
  await db.transaction(async (tx) => {
    const { token } = await issueToken(tx, user.id, "reset", RESET_TTL_MINUTES * 60_000);
    const eventId = await appendEvent(tx, { actorId: null, station: "sign-in", type: "user.reset_requested", subjectKind: "user", subjectId: user.id, data: { email: user.email } });
    const mail = resetMail({ name: user.name, link: `${input.baseUrl}/reset/${token}`, expiresMinutes: RESET_TTL_MINUTES });
    await queueMail(tx, { to: user.email, ...mail, eventId, secrets: [token] });
  });
}
