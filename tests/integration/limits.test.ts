import { execFile } from "node:child_process";
import { resolve } from "node:path";
import { promisify } from "node:util";
import { and, eq, sql } from "drizzle-orm";
import { describe, expect, test } from "vitest";
import { requestResetAction } from "@/app/(auth)/reset/actions";
import { signInAction } from "@/app/(auth)/sign-in/actions";
import { getDb } from "@/db";
import { limitHits, outbox, userRoles, users } from "@/db/schema";
import { PEER_HEADER } from "@/lib/auth/client-address";
import { hashPassword } from "@/lib/auth/password";
import { newId } from "@/lib/auth/tokens";
import { cleanUp, KEEP_MS, reserve, settle } from "@/lib/limits";
import { request } from "../setup/next-request";

const db = () => getDb();
const PASSWORD = "heartwood-walnut-7";
const run = promisify(execFile);

let serial = 0;
async function makeUser(name: string) {
  const id = newId();
  const email = `${name.toLowerCase().replace(/\W+/g, ".")}.${++serial}@limits.twinleaf.test`;
  await db().insert(users).values({ id, email, name, passwordHash: await hashPassword(PASSWORD), active: true });
  await db().insert(userRoles).values({ userId: id, role: "lab" });
  return { id, email };
}

function form(fields: Record<string, string>): FormData {
  const f = new FormData();
  for (const [k, v] of Object.entries(fields)) f.set(k, v);
  return f;
}

/** The request as it reaches an action from the connection `peer`, with what the client wrote. */
function from(peer: string, forwardedFor?: string) {
  request.sessionId = null;
  request.cookieSets = [];
  request.headers = { [PEER_HEADER]: peer, ...(forwardedFor ? { "x-forwarded-for": forwardedFor } : {}) };
}

const signInForm = (email: string, password: string) => signInAction(undefined, form({ email, password }));

describe("the store of limits", () => {
  test("a pending try counts, a success stops counting, a counted try goes on counting", async () => {
    const key = "test:states";
    const limit = [{ key, windowMs: 60_000, max: 2 }];
    const now = new Date("2025-06-01T10:00:00.000Z");
    const a = await reserve(db(), limit, { now });
    const b = await reserve(db(), limit, { now });
    expect([a.ok, b.ok]).toEqual([true, true]);
    // Two pending tries fill the limit before either is settled.
    expect(await reserve(db(), limit, { now })).toEqual({ ok: false, retryAfterMs: 60_000 });
    await settle(db(), a.ok ? a.attempt : "", "success");
    expect((await reserve(db(), limit, { now })).ok).toBe(true);
    await settle(db(), b.ok ? b.attempt : "", "counted");
    expect((await reserve(db(), limit, { now })).ok).toBe(false);
  });

  test("a refused try under one key records nothing under the others", async () => {
    const now = new Date("2025-06-01T11:00:00.000Z");
    await reserve(db(), [{ key: "test:full", windowMs: 60_000, max: 1 }], { now });
    const r = await reserve(db(), [{ key: "test:other", windowMs: 60_000, max: 5 }, { key: "test:full", windowMs: 60_000, max: 1 }], { now });
    expect(r.ok).toBe(false);
    const [row] = await db().select({ n: sql<number>`count(*)` }).from(limitHits).where(eq(limitHits.key, "test:other"));
    expect(row!.n).toBe(0);
  });

  test("rows older than a day are cleaned away, newer ones stay", async () => {
    const now = new Date("2025-06-03T00:00:00.000Z");
    await reserve(db(), [{ key: "test:old", windowMs: 60_000, max: 9 }], { now: new Date(now.getTime() - KEEP_MS - 1), state: "counted" });
    await reserve(db(), [{ key: "test:old", windowMs: 60_000, max: 9 }], { now: new Date(now.getTime() - KEEP_MS + 1), state: "counted" });
    await cleanUp(db(), now);
    const rows = await db().select().from(limitHits).where(eq(limitHits.key, "test:old"));
    expect(rows.map((r) => r.at.getTime())).toEqual([now.getTime() - KEEP_MS + 1]);
  });

  test("two server processes on one database let through no more than the limit together", async () => {
    const tsx = resolve("node_modules/.bin/tsx");
    const child = () =>
      run(tsx, ["--import", "./scripts/server-only.mjs", "tests/integration/helpers/limits-child.ts", "test:two-processes", "15", "5"], {
        env: { ...process.env },
      });
    const [one, two] = await Promise.all([child(), child()]);
    const allowed = JSON.parse(one.stdout).allowed + JSON.parse(two.stdout).allowed;
    expect(allowed).toBe(5);
    const [row] = await db().select({ n: sql<number>`count(*)` }).from(limitHits).where(eq(limitHits.key, "test:two-processes"));
    expect(row!.n).toBe(5);
  }, 60_000);
});

describe("sign-in through its server action", () => {
  test("30 wrong passwords at once: at most 5 are checked, the rest are told to wait", async () => {
    const u = await makeUser("Gunnar Threnody");
    from("192.0.2.50");
    const results = await Promise.all(Array.from({ length: 30 }, () => signInForm(u.email, "wrong-guess")));
    expect(results.filter((r) => r.status === 401)).toHaveLength(5);
    expect(results.filter((r) => r.status === 429)).toHaveLength(25);
    const checked = await db().select().from(limitHits).where(and(eq(limitHits.key, `sign-in:account:${u.email}`), eq(limitHits.state, "counted")));
    expect(checked).toHaveLength(5);
  });

  test("the right password sent at once among 29 wrong ones never opens a session once the limit is full", async () => {
    const u = await makeUser("Marit Oakhollow");
    from("192.0.2.51");
    for (let i = 0; i < 5; i++) expect((await signInForm(u.email, "wrong-guess")).status).toBe(401);
    const tries = Array.from({ length: 30 }, (_, i) => (i === 17 ? PASSWORD : "wrong-guess"));
    const results = await Promise.all(tries.map((p) => signInForm(u.email, p)));
    expect(results.every((r) => r.status === 429)).toBe(true);
    expect(request.cookieSets).toEqual([]);
  });

  test("the right password among 29 wrong ones, all at once from the start: at most 5 checked, at most one session", async () => {
    const u = await makeUser("Sunniva Bracken");
    from("192.0.2.52");
    const tries = Array.from({ length: 30 }, (_, i) => (i === 29 ? PASSWORD : "wrong-guess"));
    const results = await Promise.all(tries.map((p) => signInForm(u.email, p)));
    expect(results.filter((r) => r.status !== 429).length).toBeLessThanOrEqual(5);
    expect(results.filter((r) => r.ok).length).toBeLessThanOrEqual(1);
    // Tries queue in the order they came: the 30th is past the limit and is not checked.
    expect(results[29]!.status).toBe(429);
    expect(request.cookieSets).toEqual([]);
  });

  test.each<[string, (i: number) => string | undefined]>([
    ["a different X-Forwarded-For each time", (i) => `198.51.100.${i}`],
    ["a chain of forwarded addresses, the last one changing", (i) => `10.0.0.1, 203.0.113.${i}`],
    ["no X-Forwarded-For", () => undefined],
  ])("with %s, 20 failures from one connection still throttle it", async (_label, forwarded) => {
    const peer = `192.0.2.${60 + serial}`;
    for (let i = 0; i < 20; i++) {
      from(peer, forwarded(i));
      expect((await signInForm(`rotating.${serial}.${i}@limits.twinleaf.test`, "guess")).status).toBe(401);
    }
    from(peer, forwarded(99));
    expect((await signInForm(`rotating.${serial}.last@limits.twinleaf.test`, "guess")).status).toBe(429);
    serial++;
  });
});

describe("reset requests through their server action", () => {
  const asked = async (email: string) => (await db().select().from(outbox).where(eq(outbox.to, email))).length;

  test("42 requests for one account send 3 links, and every answer is the same", async () => {
    const u = await makeUser("Ingrid Lathe");
    from("192.0.2.70");
    const answers = [];
    for (let i = 0; i < 42; i++) {
      from(`192.0.2.${100 + (i % 5)}`); // five connections: the account's own limit holds
      answers.push(await requestResetAction(undefined, form({ email: u.email })));
    }
    expect(await asked(u.email)).toBe(3);
    expect(new Set(answers.map((a) => JSON.stringify(a))).size).toBe(1);
    // An unknown e-mail gets the same answer.
    const unknown = await requestResetAction(undefined, form({ email: "nobody.at.all@limits.twinleaf.test" }));
    expect(unknown).toEqual(answers[0]);
  });

  test("one connection asking for many accounts is stopped after 10 an hour, whatever it forwards", async () => {
    const people = await Promise.all(Array.from({ length: 12 }, (_, i) => makeUser(`Reset Person ${i}`)));
    for (const [i, p] of people.entries()) {
      from("192.0.2.80", `203.0.113.${i}`);
      await requestResetAction(undefined, form({ email: p.email }));
    }
    const sent = await Promise.all(people.map((p) => asked(p.email)));
    expect(sent).toEqual([...Array(10).fill(1), 0, 0]);
  });
});
