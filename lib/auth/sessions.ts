import "server-only";
import { eq } from "drizzle-orm";
import type { Cookie, Session } from "lucia";
import { getDb, type Db } from "@/db";
import { userRoles } from "@/db/schema";
import { ABSOLUTE_EXPIRY_MS, blankSessionCookie, getLucia, sessionCookie } from "./lucia";
import { permissionsOf, type Permission } from "./permissions";
import { isRole, sortRoles, type Role } from "./roles";

export interface AuthUser {
  id: string;
  email: string;
  name: string;
  roles: Role[];
  permissions: Set<Permission>;
}

export interface SessionCheck {
  user: AuthUser | null;
  session: Session | null;
  /**
   * Set when the cookie must change: a blank one to clear it. (The cookie lasts as long as the
   * browser, so extending the session's idle expiry needs no new cookie.)
   */
  cookie: Cookie | null;
}

export async function rolesOf(db: Db, userId: string): Promise<Role[]> {
  const rows = await db.select({ role: userRoles.role }).from(userRoles).where(eq(userRoles.userId, userId));
  return sortRoles(rows.map((r) => r.role).filter(isRole));
}

/** Creates a session for a user who has just proved who they are. */
export async function startSession(userId: string, db: Db = getDb()) {
  const lucia = getLucia(db);
  const session = await lucia.createSession(userId, { createdAt: Math.floor(Date.now() / 1000) });
  return { session, cookie: sessionCookie(session.id) };
}

export async function endSession(sessionId: string, db: Db = getDb()) {
  const lucia = getLucia(db);
  await lucia.invalidateSession(sessionId);
  return blankSessionCookie();
}

/**
 * Checks a session id from a cookie or header. Roles are read afresh on every call, so a change
 * of roles takes effect on the user's next request. Enforces the idle expiry (Lucia), the absolute
 * expiry and deactivation.
 */
export async function checkSession(sessionId: string | null | undefined, db: Db = getDb(), now = Date.now()): Promise<SessionCheck> {
  const lucia = getLucia(db);
  if (!sessionId) return { user: null, session: null, cookie: null };
  const { session, user } = await lucia.validateSession(sessionId);
  if (!session || !user) return { user: null, session: null, cookie: blankSessionCookie() };
  if (session.createdAt * 1000 + ABSOLUTE_EXPIRY_MS <= now || !user.active) {
    await lucia.invalidateSession(session.id);
    return { user: null, session: null, cookie: blankSessionCookie() };
  }
  const roles = await rolesOf(db, user.id);
  return {
    session,
    user: { id: user.id, email: user.email, name: user.name, roles, permissions: permissionsOf(roles) },
    cookie: null,
  };
}
