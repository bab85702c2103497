import { mkdtempSync } from "node:fs";
import { join } from "node:path";
import { and, eq, sql, type SQL } from "drizzle-orm";
import type { SQLiteTable } from "drizzle-orm/sqlite-core";
import { beforeAll, describe, expect, onTestFinished, test } from "vitest";
import { getDb } from "@/db";
import { authTokens, events, limitHits, mailSecrets, outbox, sessions, userRoles, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { AppError } from "@/lib/auth/errors";
import { ABSOLUTE_EXPIRY_MS, SESSION_COOKIE, storedSessionId } from "@/lib/auth/lucia";
import { hashPassword } from "@/lib/auth/password";
import type { Role } from "@/lib/auth/roles";
import { checkSession, startSession } from "@/lib/auth/sessions";
import { SIGN_IN_REFUSED, signIn, throttledMessage } from "@/lib/auth/sign-in";
import { newId } from "@/lib/auth/tokens";
import { startFakeSmtp } from "@/lib/mail/fake-smtp";
import { readMailbox } from "@/lib/mail/mailbox";
import { deliverDue } from "@/lib/mail/sender";
import { createMailTransport } from "@/lib/mail/transport";
import {
  acceptInvite,
  deactivateUser,
  findToken,
  inviteUser,
  requestPasswordReset,
  resetPassword,
  setRoles,
} from "@/lib/users/queries";

const db = () => getDb();
const BASE_URL = "http://localhost:3000";
const PASSWORD = "heartwood-walnut-7";
const MIN = 60_000;

let admin: { id: string; name: string };
let qualityDemo: { id: string; name: string };

beforeAll(async () => {
  // The seed refuses once non-demo users exist, so it runs before any test adds its own.
  await seedDemo(db(), { history: false });
  admin = await byEmail("admin@demo.twinleaf.test");
  qualityDemo = await byEmail("quality@demo.twinleaf.test");
});

async function byEmail(email: string) {
  const [u] = await db().select().from(users).where(eq(users.email, email));
  if (!u) throw new Error(`no user ${email}`);
  return u;
}

let serial = 0;
/** A user of this file's own, so tests that change a user leave the demo users alone. */
async function makeUser(name: string, opts: { roles?: Role[]; password?: string | null; active?: boolean } = {}) {
  const id = newId();
  const email = `${name.toLowerCase().replace(/\W+/g, ".")}.${++serial}@workshop.twinleaf.test`;
  const password = opts.password === undefined ? PASSWORD : opts.password;
  await db().insert(users).values({ id, email, name, passwordHash: password ? await hashPassword(password) : null, active: opts.active ?? true });
  const roles = opts.roles ?? ["lab"];
  if (roles.length) await db().insert(userRoles).values(roles.map((role) => ({ userId: id, role })));
  return { id, email, name };
}

async function count(table: SQLiteTable, where?: SQL) {
  const [row] = await db().select({ n: sql<number>`count(*)` }).from(table).where(where);
  return Number(row?.n ?? -1);
}

const counts = async () => ({
  users: await count(users),
  userRoles: await count(userRoles),
  events: await count(events),
  outbox: await count(outbox),
  authTokens: await count(authTokens),
});

const eventsOf = (subjectId: string, type: string) =>
  db().select().from(events).where(and(eq(events.subjectKind, "user"), eq(events.subjectId, subjectId), eq(events.type, type)));

/** Starts a fake SMTP server in a fresh folder for this test and delivers everything due through it. */
async function deliverToMailbox(label: string) {
  const dir = mkdtempSync(join(process.env.TWINLEAF_TEST_DIR!, `${label}-`));
  const smtp = await startFakeSmtp({ port: 0, dir });
  onTestFinished(() => smtp.close());
  const transport = createMailTransport({
    smtp: { host: "127.0.0.1", port: smtp.port, secure: false },
    from: "Twinleaf <no-reply@twinleaf.test>",
    mailboxDir: dir,
  });
  const result = await deliverDue(db(), transport);
  return { result, inbox: await readMailbox(dir) };
}

/** The one-time token in the link of the only message to `to`. */
function tokenFrom(inbox: { to: string; text: string }[], to: string, path: "invite" | "reset"): string {
  const mine = inbox.filter((m) => m.to === to);
  expect(mine).toHaveLength(1);
  const link = new RegExp(`${BASE_URL}/${path}/([A-Za-z0-9_-]+)`).exec(mine[0]!.text);
  expect(link, mine[0]!.text).not.toBeNull();
  return link![1]!;
}

async function appErrorOf(p: Promise<unknown>): Promise<AppError> {
  try {
    await p;
  } catch (e) {
    expect(e).toBeInstanceOf(AppError);
    return e as AppError;
  }
  throw new Error("expected an AppError, but the call succeeded");
}

describe("sign-in", () => {
  test("the right e-mail and password sign in, whatever the case and spaces of the e-mail", async () => {
    const u = await makeUser("Ilse Brackwater");
    const result = await signIn(db(), { email: `  ${u.email.toUpperCase()} `, password: PASSWORD, address: "192.0.2.1" });
    expect(result).toEqual({ ok: true, userId: u.id });
    expect(await eventsOf(u.id, "user.signed_in")).toHaveLength(1);
  });

  // Every refusal must look the same, so the answer never tells whether an account exists or is usable.
  test.each<[string, () => Promise<{ email: string; password: string }>]>([
    ["a wrong password", async () => ({ email: (await makeUser("Odo Fennimore")).email, password: "not-the-password" })],
    ["an unknown e-mail", async () => ({ email: "nobody.here@workshop.twinleaf.test", password: PASSWORD })],
    ["a deactivated user with the right password", async () => ({ email: (await makeUser("Pim Quarrel", { active: false })).email, password: PASSWORD })],
    ["an invited user who has not chosen a password", async () => ({ email: (await makeUser("Tove Ashgrove", { password: null })).email, password: PASSWORD })],
  ])("%s is refused with SIGN_IN_REFUSED", async (_label, make) => {
    const { email, password } = await make();
    const eventsBefore = await count(events);
    const result = await signIn(db(), { email, password, address: "192.0.2.2" });
    expect(result).toStrictEqual({ ok: false, reason: "invalid", message: SIGN_IN_REFUSED });
    expect(await count(events)).toBe(eventsBefore);
    // The failure is recorded against the e-mail typed, known or not, for the throttle.
    expect(await count(limitHits, and(eq(limitHits.key, `sign-in:account:${email}`), eq(limitHits.state, "counted")))).toBe(1);
  });

  test("a user deactivated through deactivateUser is refused like anyone else", async () => {
    const u = await makeUser("Rune Copperfield");
    await deactivateUser(db(), { userId: u.id, actor: admin });
    expect(await signIn(db(), { email: u.email, password: PASSWORD, address: "192.0.2.3" })).toStrictEqual({
      ok: false, reason: "invalid", message: SIGN_IN_REFUSED,
    });
  });
});

describe("sign-in throttling", () => {
  // A fixed clock, passed as `now`, makes the waits exact; each test has its own e-mails and addresses.
  const T0 = new Date("2025-03-03T08:00:00.000Z").getTime();
  const at = (ms: number) => new Date(T0 + ms);

  async function failFiveTimes(email: string, address: string) {
    for (let i = 0; i < 5; i++) {
      const r = await signIn(db(), { email, password: "wrong-password", address, now: at(i * 1000) });
      expect(r.ok, `failure ${i + 1}`).toBe(false);
      if (!r.ok) expect(r.reason, `failure ${i + 1}`).toBe("invalid");
    }
  }

  test("after 5 failures on an account, even the right password is throttled until the window passes", async () => {
    const u = await makeUser("Wendel Marrow");
    await failFiveTimes(u.email, "198.51.100.10");

    // Oldest failure at T0, window 15 min: at T0 + 5 s there are 895 s left.
    const sixth = await signIn(db(), { email: u.email, password: PASSWORD, address: "198.51.100.10", now: at(5000) });
    expect(sixth).toStrictEqual({ ok: false, reason: "throttled", retryAfterSeconds: 895, message: throttledMessage(895) });
    expect(sixth.ok === false && sixth.message).toMatch(/Wait 15 minutes/);
    // A throttled try is not checked, so it records no success even with the right password.
    expect(await count(limitHits, and(eq(limitHits.key, `sign-in:account:${u.email}`), eq(limitHits.state, "success")))).toBe(0);

    // From another address too: the account limit is the account's.
    const elsewhere = await signIn(db(), { email: u.email, password: PASSWORD, address: "198.51.100.99", now: at(5000) });
    expect(elsewhere.ok === false && elsewhere.reason).toBe("throttled");

    // 1 ms before the oldest failure leaves the window: still throttled, rounded up to 1 s.
    const almost = await signIn(db(), { email: u.email, password: PASSWORD, address: "198.51.100.10", now: at(15 * MIN - 1) });
    expect(almost).toMatchObject({ ok: false, reason: "throttled", retryAfterSeconds: 1 });

    const after = await signIn(db(), { email: u.email, password: PASSWORD, address: "198.51.100.10", now: at(15 * MIN) });
    expect(after).toEqual({ ok: true, userId: u.id });

    // A success clears the account's count: four failures are still in the window, yet a new
    // wrong try is answered as wrong, not throttled.
    const next = await signIn(db(), { email: u.email, password: "wrong-password", address: "198.51.100.10", now: at(15 * MIN + 1000) });
    expect(next).toStrictEqual({ ok: false, reason: "invalid", message: SIGN_IN_REFUSED });
  });

  test("an unknown e-mail throttles exactly like a real account", async () => {
    const real = await makeUser("Hester Vale");
    await failFiveTimes(real.email, "198.51.100.20");
    await failFiveTimes("no.such.person@workshop.twinleaf.test", "198.51.100.21");

    const known = await signIn(db(), { email: real.email, password: PASSWORD, address: "198.51.100.20", now: at(5000) });
    const unknown = await signIn(db(), { email: "no.such.person@workshop.twinleaf.test", password: PASSWORD, address: "198.51.100.21", now: at(5000) });
    expect(known).toMatchObject({ ok: false, reason: "throttled" });
    expect(unknown).toStrictEqual(known);
  });

  test("20 failures from one address throttle a 21st e-mail from it, but not from another address", async () => {
    const T1 = 2 * 3600_000; // two hours after T0, clear of the other tests' windows
    for (let i = 0; i < 20; i++) {
      const r = await signIn(db(), { email: `stranger.${i}@workshop.twinleaf.test`, password: "guess", address: "203.0.113.7", now: at(T1 + i * 1000) });
      expect(r.ok === false && r.reason, `failure ${i + 1}`).toBe("invalid");
    }
    const u = await makeUser("Ambrose Tilling");
    // Oldest address failure at T1: at T1 + 21 s, 879 s are left.
    const fromSame = await signIn(db(), { email: u.email, password: PASSWORD, address: "203.0.113.7", now: at(T1 + 21_000) });
    expect(fromSame).toStrictEqual({ ok: false, reason: "throttled", retryAfterSeconds: 879, message: throttledMessage(879) });
    const fromOther = await signIn(db(), { email: u.email, password: PASSWORD, address: "203.0.113.8", now: at(T1 + 21_000) });
    expect(fromOther).toEqual({ ok: true, userId: u.id });
  });
});

describe("sessions", () => {
  test("a fresh session gives the user with roles and permissions", async () => {
    const u = await makeUser("Signe Holloway", { roles: ["lab"] });
    const { session, cookie } = await startSession(u.id, db());
    expect(cookie.name).toBe(SESSION_COOKIE);
    expect(cookie.value).toBe(session.id);
    const check = await checkSession(session.id, db());
    expect(check.session?.id).toBe(session.id);
    expect(check.user).toMatchObject({ id: u.id, email: u.email, name: u.name, roles: ["lab"] });
    expect([...check.user!.permissions].sort()).toEqual(["lab.work", "labels.print", "register.read"]);
  });

  test("a role change shows on the next check, with no new sign-in", async () => {
    const u = await makeUser("Corin Ashby", { roles: ["lab"] });
    const { session } = await startSession(u.id, db());
    await setRoles(db(), { userId: u.id, roles: ["quality"], actor: admin });
    const check = await checkSession(session.id, db());
    expect(check.user?.roles).toEqual(["quality"]);
    expect([...check.user!.permissions].sort()).toEqual(["labels.print", "quality.work", "register.read"]);
    expect(await eventsOf(u.id, "user.roles_changed")).toMatchObject([{ data: { from: ["lab"], to: ["quality"] }, actorId: admin.id }]);
  });

  test("deactivateUser ends every session of the user and records it", async () => {
    const u = await makeUser("Mireille Sandover");
    const other = await makeUser("Lorcan Thistle");
    const a = await startSession(u.id, db());
    const b = await startSession(u.id, db());
    const untouched = await startSession(other.id, db());

    await deactivateUser(db(), { userId: u.id, actor: admin, reason: "left the workshop" });

    for (const s of [a, b]) {
      const check = await checkSession(s.session.id, db());
      expect(check.user).toBeNull();
      expect(check.cookie?.value).toBe("");
    }
    expect(await count(sessions, eq(sessions.userId, u.id))).toBe(0);
    expect((await checkSession(untouched.session.id, db())).user?.id).toBe(other.id);
    expect(await eventsOf(u.id, "user.deactivated")).toMatchObject([
      { actorId: admin.id, station: "admin", data: { sessionsEnded: 2 }, reason: "left the workshop" },
    ]);
  });

  test("a session that survives its user's deactivation is still refused", async () => {
    // Defence in depth: checkSession itself checks `active`, not only deactivateUser's cleanup.
    const u = await makeUser("Bertil Knoll");
    const { session } = await startSession(u.id, db());
    await db().update(users).set({ active: false }).where(eq(users.id, u.id));
    expect((await checkSession(session.id, db())).user).toBeNull();
    expect(await count(sessions, eq(sessions.id, storedSessionId(session.id)))).toBe(0);
  });

  test("the absolute expiry: 7 days after it began, a session is gone", async () => {
    const u = await makeUser("Nell Greaves");
    const { session } = await startSession(u.id, db());
    const began = session.createdAt * 1000; // Unix seconds in the row

    const justBefore = await checkSession(session.id, db(), began + ABSOLUTE_EXPIRY_MS - 1);
    expect(justBefore.user?.id).toBe(u.id);

    const past = await checkSession(session.id, db(), Date.now() + ABSOLUTE_EXPIRY_MS + 1000);
    expect(past).toMatchObject({ user: null, session: null });
    expect(past.cookie).toMatchObject({ name: SESSION_COOKIE, value: "" });
    expect(await count(sessions, eq(sessions.id, storedSessionId(session.id)))).toBe(0);
  });

  test("the idle expiry: a session past its expires_at is gone", async () => {
    const u = await makeUser("Ottilie Brand");
    const { session } = await startSession(u.id, db());
    await db().update(sessions).set({ expiresAt: Math.floor(Date.now() / 1000) - 1 }).where(eq(sessions.id, storedSessionId(session.id)));
    expect((await checkSession(session.id, db())).user).toBeNull();
    expect(await count(sessions, eq(sessions.id, storedSessionId(session.id)))).toBe(0);
  });

  test("an unknown session id gives no user and a blank cookie; no id gives no cookie at all", async () => {
    const check = await checkSession("no-such-session-id", db());
    expect(check).toMatchObject({ user: null, session: null });
    expect(check.cookie).toMatchObject({ name: SESSION_COOKIE, value: "" });
    expect(await checkSession(undefined, db())).toEqual({ user: null, session: null, cookie: null });
  });
});

describe("invite, end to end", () => {
  test("the invite mail's link sets the password once; signing in then works", async () => {
    const email = "freya.lindqvist@workshop.twinleaf.test";
    const { userId } = await inviteUser(db(), { email, name: "Freya Lindqvist", roles: ["lab", "quality"], actor: admin, baseUrl: BASE_URL });

    // The mail and its event were written together: the outbox row names the event.
    const invited = await eventsOf(userId, "user.invited");
    expect(invited).toHaveLength(1);
    expect(invited[0]).toMatchObject({ actorId: admin.id, data: { email, roles: ["lab", "quality"] } });
    const queued = await db().select().from(outbox).where(eq(outbox.to, email));
    expect(queued).toHaveLength(1);
    expect(queued[0]!.eventId).toBe(invited[0]!.id);
    // The stored token is a hash: the raw token is in the mail only.
    const [stored] = await db().select().from(authTokens).where(eq(authTokens.userId, userId));
    expect(queued[0]!.text).not.toContain(stored!.tokenHash);

    // Not yet a usable account.
    expect(await signIn(db(), { email, password: PASSWORD, address: "192.0.2.10" })).toMatchObject({ ok: false, reason: "invalid" });

    const { result, inbox } = await deliverToMailbox("invite");
    expect(result.sent).toBeGreaterThanOrEqual(1);
    const token = tokenFrom(inbox, email, "invite");
    expect((await findToken(db(), token, "invite"))?.userId).toBe(userId);

    // An invite token is not a reset token.
    expect((await appErrorOf(resetPassword(db(), { token, password: PASSWORD }))).status).toBe(410);

    expect(await acceptInvite(db(), { token, password: PASSWORD })).toEqual({ userId });
    expect(await eventsOf(userId, "user.joined")).toHaveLength(1);
    expect(await signIn(db(), { email, password: PASSWORD, address: "192.0.2.10" })).toEqual({ ok: true, userId });

    const again = await appErrorOf(acceptInvite(db(), { token, password: "another-password-1" }));
    expect(again.status).toBe(410);
    // The second try changed nothing: the first password still works, and only one join is recorded.
    expect(await signIn(db(), { email, password: PASSWORD, address: "192.0.2.10" })).toEqual({ ok: true, userId });
    expect(await eventsOf(userId, "user.joined")).toHaveLength(1);
  });

  test("an expired invite token is refused with 410 and sets no password", async () => {
    const email = "gideon.parr@workshop.twinleaf.test";
    const { userId } = await inviteUser(db(), { email, name: "Gideon Parr", roles: ["packing"], actor: admin, baseUrl: BASE_URL });
    const [mail] = await db().select().from(outbox).where(eq(outbox.to, email));
    // Not yet sent, so the token still waits beside the outbox (the outbox itself never holds it).
    const [secrets] = await db().select().from(mailSecrets).where(eq(mailSecrets.outboxId, mail!.id));
    const token = Object.values(secrets!.values)[0]!;
    // Move the expiry to one second ago, as if the 72 hours had passed.
    await db().update(authTokens).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(authTokens.userId, userId));

    expect((await appErrorOf(acceptInvite(db(), { token, password: PASSWORD }))).status).toBe(410);
    const [u] = await db().select().from(users).where(eq(users.id, userId));
    expect(u!.passwordHash).toBeNull();
    expect(await eventsOf(userId, "user.joined")).toHaveLength(0);
  });

  test("inviting an e-mail already registered fails with 409 and writes nothing", async () => {
    const before = await counts();
    const err = await appErrorOf(
      // Same address as a demo user, in other case and with spaces: it is normalised first.
      inviteUser(db(), { email: "  LAB@Demo.Twinleaf.test ", name: "Second Lab", roles: ["lab"], actor: admin, baseUrl: BASE_URL }),
    );
    expect(err.status).toBe(409);
    expect(err.fieldErrors?.email?.length).toBeGreaterThan(0);
    expect(await counts()).toEqual(before);
  });
});

describe("password reset, end to end", () => {
  test.each<[string, () => Promise<string>]>([
    ["an unknown e-mail", async () => "never.registered@workshop.twinleaf.test"],
    ["a deactivated user", async () => (await makeUser("Aurel Dunmore", { active: false })).email],
    ["an invited user without a password", async () => (await makeUser("Linnea Farrow", { password: null })).email],
  ])("a request for %s queues nothing", async (_label, emailOf) => {
    const email = await emailOf();
    const before = await counts();
    await requestPasswordReset(db(), { email, baseUrl: BASE_URL, address: "192.0.2.40" });
    expect(await counts()).toEqual(before);
  });

  test("a real user's reset link sets a new password once and ends every session", async () => {
    const u = await makeUser("Esmond Rookley");
    const s1 = await startSession(u.id, db());
    const s2 = await startSession(u.id, db());
    const before = await counts();

    await requestPasswordReset(db(), { email: u.email.toUpperCase(), baseUrl: BASE_URL, address: "192.0.2.41" });
    const requested = await eventsOf(u.id, "user.reset_requested");
    expect(requested).toHaveLength(1);
    const queued = await db().select().from(outbox).where(eq(outbox.to, u.email));
    expect(queued).toHaveLength(1);
    expect(queued[0]!.eventId).toBe(requested[0]!.id);
    expect(await counts()).toEqual({ ...before, events: before.events + 1, outbox: before.outbox + 1, authTokens: before.authTokens + 1 });

    const { inbox } = await deliverToMailbox("reset");
    const token = tokenFrom(inbox, u.email, "reset");
    const fresh = "spalted-beech-44";
    expect(await resetPassword(db(), { token, password: fresh })).toEqual({ userId: u.id });

    expect(await signIn(db(), { email: u.email, password: PASSWORD, address: "192.0.2.20" })).toStrictEqual({
      ok: false, reason: "invalid", message: SIGN_IN_REFUSED,
    });
    expect(await signIn(db(), { email: u.email, password: fresh, address: "192.0.2.20" })).toEqual({ ok: true, userId: u.id });
    for (const s of [s1, s2]) expect((await checkSession(s.session.id, db())).user).toBeNull();
    expect(await count(sessions, eq(sessions.userId, u.id))).toBe(0);
    expect(await eventsOf(u.id, "user.password_reset")).toHaveLength(1);

    expect((await appErrorOf(resetPassword(db(), { token, password: "third-password-9" }))).status).toBe(410);
    expect(await signIn(db(), { email: u.email, password: fresh, address: "192.0.2.20" })).toEqual({ ok: true, userId: u.id });
  });
});

describe("the last active administrator", () => {
  // Runs last in this file: it changes the demo admin, whom earlier tests use as the actor.
  const rolesOf = async (userId: string) =>
    (await db().select({ role: userRoles.role }).from(userRoles).where(eq(userRoles.userId, userId))).map((r) => r.role).sort();

  test("cannot lose the admin role", async () => {
    const before = await counts();
    const err = await appErrorOf(setRoles(db(), { userId: admin.id, roles: ["quality"], actor: qualityDemo }));
    expect(err.status).toBe(409);
    expect(err.message).toMatch(/last active administrator/);
    expect(await rolesOf(admin.id)).toEqual(["admin"]);
    expect(await counts()).toEqual(before);
  });

  test("cannot be deactivated", async () => {
    const before = await counts();
    const err = await appErrorOf(deactivateUser(db(), { userId: admin.id, actor: qualityDemo }));
    expect(err.status).toBe(409);
    // The refusal must be the last-admin rule, not the "not yourself" rule.
    expect(err.message).toMatch(/last active administrator/);
    expect((await byEmail("admin@demo.twinleaf.test")).active).toBe(true);
    expect(await counts()).toEqual(before);
  });

  test("a deactivated second admin does not count", async () => {
    await makeUser("Dagny Rowan", { roles: ["admin"], active: false });
    expect((await appErrorOf(setRoles(db(), { userId: admin.id, roles: ["quality"], actor: qualityDemo }))).status).toBe(409);
    expect((await appErrorOf(deactivateUser(db(), { userId: admin.id, actor: qualityDemo }))).status).toBe(409);
  });

  test("an invited admin who has not yet chosen a password does not count", async () => {
    // Such an admin cannot sign in (the admin list shows them as "invited"), and their link
    // expires after 72 hours: letting the only signed-in admin step down could leave nobody able to administer.
    const { userId: pending } = await inviteUser(db(), {
      email: "pending.admin@workshop.twinleaf.test", name: "Pending Admin", roles: ["admin"], actor: admin, baseUrl: BASE_URL,
    });
    const outcome = await setRoles(db(), { userId: admin.id, roles: ["quality"], actor: qualityDemo }).then(
      () => "allowed",
      (e: unknown) => (e instanceof AppError ? e.status : String(e)),
    );
    // Put things back either way, so the next test starts with the demo admin as the only one.
    if (outcome === "allowed") await setRoles(db(), { userId: admin.id, roles: ["admin"], actor: qualityDemo });
    await deactivateUser(db(), { userId: pending, actor: admin });
    expect(outcome).toBe(409);
  });

  test("with a second active admin, either may step down", async () => {
    const second = await makeUser("Halvard Oakes", { roles: ["admin"] });
    await setRoles(db(), { userId: admin.id, roles: ["quality"], actor: second });
    expect(await rolesOf(admin.id)).toEqual(["quality"]);
    // Now `second` is the last one.
    expect((await appErrorOf(deactivateUser(db(), { userId: second.id, actor: qualityDemo }))).status).toBe(409);
    await setRoles(db(), { userId: admin.id, roles: ["admin"], actor: second });
    await deactivateUser(db(), { userId: second.id, actor: admin });
    expect((await byEmail(second.email)).active).toBe(false);
  });
});
