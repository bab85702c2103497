/**
 * The session cookie and what the database keeps of it, through the real sign-in and sign-out
 * actions and a real route handler. An attacker who reads the sessions table must not be able to
 * use what is there as a cookie; the cookie itself must end with the browser.
 */
import { eq } from "drizzle-orm";
import { afterEach, beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { sessions, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { IDLE_EXPIRY, SESSION_COOKIE, storedSessionId } from "@/lib/auth/lucia";
import { checkSession, startSession } from "@/lib/auth/sessions";
import { signInAction } from "@/app/(auth)/sign-in/actions";
import { signOutAction } from "@/app/(workshop)/sign-out";
import { GET as me } from "@/app/api/v1/me/route";
import { RedirectSignal, request } from "../setup/next-request";

const db = () => getDb();
let labId: string;

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  labId = (await db().select().from(users).where(eq(users.email, "lab@demo.twinleaf.test")))[0]!.id;
});

afterEach(() => {
  request.sessionId = null;
  request.cookieSets = [];
  request.setCookieHeaders = [];
});

function form(values: Record<string, string>) {
  const fd = new FormData();
  for (const [k, v] of Object.entries(values)) fd.set(k, v);
  return fd;
}

async function signInThroughTheForm(): Promise<string> {
  await expect(signInAction(undefined, form({ email: "lab@demo.twinleaf.test", password: "twinleaf-demo" }))).rejects.toBeInstanceOf(RedirectSignal);
  const set = request.cookieSets.filter((c) => c.name === SESSION_COOKIE);
  expect(set).toHaveLength(1);
  return set[0]!.value;
}

/** GET /api/v1/me with this cookie value, as the route handler answers it. */
async function meWith(cookieValue: string | null) {
  request.sessionId = cookieValue;
  const res = await me(new Request("http://localhost:3000/api/v1/me"), { params: Promise.resolve({}) });
  return res.status;
}

/** A Set-Cookie line's attributes, by lower-case name ("" for a flag). */
function attributes(line: string): Map<string, string> {
  const [, ...parts] = line.split(";").map((p) => p.trim());
  return new Map(parts.map((p) => [p.split("=")[0]!.toLowerCase(), p.includes("=") ? p.slice(p.indexOf("=") + 1) : ""]));
}

describe("what the sessions table keeps", () => {
  test("the row holds the SHA-256 of the cookie's id, never the id", async () => {
    const before = new Set((await db().select({ id: sessions.id }).from(sessions)).map((r) => r.id));
    const cookie = await signInThroughTheForm();
    const fresh = (await db().select().from(sessions).where(eq(sessions.userId, labId))).filter((r) => !before.has(r.id));
    expect(fresh).toHaveLength(1);
    // SHA-256 in hex, as node:crypto computes it (hashToken); an independent check of one value follows.
    expect(fresh[0]!.id).toBe(storedSessionId(cookie));
    expect(fresh[0]!.id).not.toBe(cookie);
    expect(fresh[0]!.id).toMatch(/^[0-9a-f]{64}$/);
    expect(await db().select().from(sessions).where(eq(sessions.id, cookie))).toEqual([]);
  });

  test.each([
    // FIPS 180-2, Appendix B.1 (one-block message "abc"); quoted from memory.
    ["abc", "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad"],
    // FIPS 180-2, Appendix B.2 (multi-block message); quoted from memory.
    ["abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq", "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1"],
  ])("storedSessionId(%j) is SHA-256 in hex", (input, expected) => {
    expect(storedSessionId(input)).toBe(expected);
  });

  test("the cookie's value opens the session; the stored value, used as a cookie, does not", async () => {
    const cookie = await signInThroughTheForm();
    const [row] = await db().select().from(sessions).where(eq(sessions.id, storedSessionId(cookie)));
    expect(await meWith(cookie)).toBe(200);
    expect(await meWith(row!.id)).toBe(401);
    // The refused cookie is cleared, and the real session is left as it was.
    expect(request.cookieSets).toContainEqual({ name: SESSION_COOKIE, value: "" });
    expect(await meWith(cookie)).toBe(200);
  });

  test("signing out deletes the row, and the cookie no longer opens anything", async () => {
    const cookie = await signInThroughTheForm();
    request.sessionId = cookie;
    await expect(signOutAction(undefined, form({}))).rejects.toBeInstanceOf(RedirectSignal);
    expect(await db().select().from(sessions).where(eq(sessions.id, storedSessionId(cookie)))).toEqual([]);
    expect(await meWith(cookie)).toBe(401);
  });

  test("a session in use is extended in the table under its hash, with no new cookie", async () => {
    const { session } = await startSession(labId, db());
    // Less than half the idle time left: Lucia extends it on the next check.
    const soon = Math.floor(Date.now() / 1000) + 3600;
    await db().update(sessions).set({ expiresAt: soon }).where(eq(sessions.id, storedSessionId(session.id)));
    const check = await checkSession(session.id, db());
    expect(check.user?.id).toBe(labId);
    expect(check.cookie).toBeNull();
    const [row] = await db().select().from(sessions).where(eq(sessions.id, storedSessionId(session.id)));
    expect(row!.expiresAt).toBeGreaterThanOrEqual(Math.floor(Date.now() / 1000) + IDLE_EXPIRY.seconds() - 5);
  });
});

describe("the Set-Cookie header", () => {
  test("signing in sets a browser-session cookie: HttpOnly, SameSite=Lax, Path=/, no Max-Age, no Expires", async () => {
    await signInThroughTheForm();
    const lines = request.setCookieHeaders.filter((l) => l.startsWith(`${SESSION_COOKIE}=`));
    expect(lines).toHaveLength(1);
    const attrs = attributes(lines[0]!);
    expect(attrs.has("httponly")).toBe(true);
    expect(attrs.get("samesite")?.toLowerCase()).toBe("lax");
    expect(attrs.get("path")).toBe("/");
    expect(attrs.has("max-age")).toBe(false);
    expect(attrs.has("expires")).toBe(false);
    // Secure only in production, where the site is served over https (checked in tests/e2e/security-headers).
    expect(attrs.has("secure")).toBe(process.env.NODE_ENV === "production");
  });

  test("signing out clears the cookie at once, with the same attributes", async () => {
    const cookie = await signInThroughTheForm();
    request.sessionId = cookie;
    request.setCookieHeaders = [];
    await expect(signOutAction(undefined, form({}))).rejects.toBeInstanceOf(RedirectSignal);
    const [line] = request.setCookieHeaders.filter((l) => l.startsWith(`${SESSION_COOKIE}=`));
    expect(line).toMatch(new RegExp(`^${SESSION_COOKIE}=;`));
    const attrs = attributes(line!);
    expect(attrs.get("max-age")).toBe("0");
    expect(attrs.has("httponly")).toBe(true);
    expect(attrs.get("path")).toBe("/");
  });
});
