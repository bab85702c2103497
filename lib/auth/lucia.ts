import "server-only";
import { DrizzleSQLiteAdapter } from "@lucia-auth/adapter-drizzle";
import { Lucia, TimeSpan } from "lucia";
import { getDb, withWriteLock, type Db } from "@/db";
import { sessions, users } from "@/db/schema";

/** A session ends after this long without use (Lucia extends it while in use)… */
export const IDLE_EXPIRY = new TimeSpan(12, "h");
/** …and in any case this long after it began. */
export const ABSOLUTE_EXPIRY_MS = 7 * 24 * 60 * 60 * 1000;

export { SESSION_COOKIE } from "./lucia-cookie";
import { SESSION_COOKIE } from "./lucia-cookie";

/** Lucia's adapter with its writes taking turns through the process's write lock (see db/index.ts). */
class LockedAdapter extends DrizzleSQLiteAdapter {
  override setSession: DrizzleSQLiteAdapter["setSession"] = (s) => withWriteLock(() => super.setSession(s));
  override deleteSession: DrizzleSQLiteAdapter["deleteSession"] = (id) => withWriteLock(() => super.deleteSession(id));
  override deleteUserSessions: DrizzleSQLiteAdapter["deleteUserSessions"] = (id) => withWriteLock(() => super.deleteUserSessions(id));
  override updateSessionExpiration: DrizzleSQLiteAdapter["updateSessionExpiration"] = (id, at) => withWriteLock(() => super.updateSessionExpiration(id, at));
  override deleteExpiredSessions: DrizzleSQLiteAdapter["deleteExpiredSessions"] = () => withWriteLock(() => super.deleteExpiredSessions());
}

function createLucia(db: Db) {
  return new Lucia(new LockedAdapter(db, sessions, users), {
    sessionExpiresIn: IDLE_EXPIRY,
    sessionCookie: {
      name: SESSION_COOKIE,
      // A browser-session cookie: closing the browser on a shared shop tablet ends it too.
      expires: false,
      attributes: { secure: process.env.NODE_ENV === "production", sameSite: "lax" },
    },
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
