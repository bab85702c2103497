import "server-only";
import { DrizzleSQLiteAdapter } from "@lucia-auth/adapter-drizzle";
import { Cookie, Lucia, TimeSpan, type CookieAttributes } from "lucia";
import { getDb, withWriteLock, type Db } from "@/db";
import { sessions, users } from "@/db/schema";
import { hashToken } from "./tokens";

/** A session ends after this long without use (Lucia extends it while in use)… */
export const IDLE_EXPIRY = new TimeSpan(12, "h");
/** …and in any case this long after it began. */
export const ABSOLUTE_EXPIRY_MS = 7 * 24 * 60 * 60 * 1000;

export { SESSION_COOKIE } from "./lucia-cookie";
import { SESSION_COOKIE } from "./lucia-cookie";

/** What the sessions table keeps of a session id: its SHA-256, so a copy of the table opens no session. */
export const storedSessionId = (sessionId: string) => hashToken(sessionId);

/**
 * Lucia's Drizzle adapter with two changes. Every id that goes in is hashed, and the session that
 * comes out carries the id it was asked for, so Lucia itself only ever sees the cookie's id and
 * the table only its hash. And writes take turns through the process's write lock (db/index.ts).
 */
class HashedLockedAdapter extends DrizzleSQLiteAdapter {
  override getSessionAndUser: DrizzleSQLiteAdapter["getSessionAndUser"] = async (id) => {
    const [session, user] = await super.getSessionAndUser(storedSessionId(id));
    return [session ? { ...session, id } : null, user];
  };
  override setSession: DrizzleSQLiteAdapter["setSession"] = (s) => withWriteLock(() => super.setSession({ ...s, id: storedSessionId(s.id) }));
  override deleteSession: DrizzleSQLiteAdapter["deleteSession"] = (id) => withWriteLock(() => super.deleteSession(storedSessionId(id)));
  override updateSessionExpiration: DrizzleSQLiteAdapter["updateSessionExpiration"] = (id, at) =>
    withWriteLock(() => super.updateSessionExpiration(storedSessionId(id), at));
  override deleteUserSessions: DrizzleSQLiteAdapter["deleteUserSessions"] = (id) => withWriteLock(() => super.deleteUserSessions(id));
  override deleteExpiredSessions: DrizzleSQLiteAdapter["deleteExpiredSessions"] = () => withWriteLock(() => super.deleteExpiredSessions());
  // The table cannot give back the ids it never kept.
  override getUserSessions: DrizzleSQLiteAdapter["getUserSessions"] = async () => {
    throw new Error("session ids are stored only as hashes and cannot be listed");
  };
}

/**
 * The cookie's attributes (OWASP ASVS 4.0.3 V3.4, docs/REFERENCES.md, § Records, mail and the web):
 * HttpOnly, Secure in production, SameSite=Lax, Path=/, and neither Max-Age nor Expires, so it is
 * a browser-session cookie: closing the browser on a shared shop tablet ends it too, and the
 * server's idle and absolute expiries end the session behind it.
 */
export const SESSION_COOKIE_ATTRIBUTES: CookieAttributes = {
  httpOnly: true,
  secure: process.env.NODE_ENV === "production",
  sameSite: "lax",
  path: "/",
};

/** The cookie that carries a session id. (Lucia's own would last 400 days when told not to expire.) */
export function sessionCookie(sessionId: string): Cookie {
  return new Cookie(SESSION_COOKIE, sessionId, { ...SESSION_COOKIE_ATTRIBUTES });
}

/** The cookie that clears it. */
export function blankSessionCookie(): Cookie {
  return new Cookie(SESSION_COOKIE, "", { ...SESSION_COOKIE_ATTRIBUTES, maxAge: 0 });
}

function createLucia(db: Db) {
  return new Lucia(new HashedLockedAdapter(db, sessions, users), {
    sessionExpiresIn: IDLE_EXPIRY,
    // Unused (sessionCookie() above makes the cookie), but kept in step with it.
    sessionCookie: { name: SESSION_COOKIE, attributes: { secure: SESSION_COOKIE_ATTRIBUTES.secure, sameSite: "lax", path: "/" } },
    getSessionAttributes: (attrs) => ({ createdAt: attrs.createdAt }),
    getUserAttributes: (attrs) => ({ email: attrs.email, name: attrs.name, active: attrs.active }),
  });
}

export type TwinleafLucia = ReturnType<typeof createLucia>;

const cache = new WeakMap<Db, TwinleafLucia>();
export function getLucia(db: Db = getDb()): TwinleafLucia {
  let lucia = cache.get(db);
  if (!lucia) {
    lucia = createLucia(db);
    cache.set(db, lucia);
  }
  return lucia;
}

declare module "lucia" {
  interface Register {
    Lucia: TwinleafLucia;
    DatabaseSessionAttributes: { createdAt: number };
    DatabaseUserAttributes: { email: string; name: string; active: boolean };
  }
}
