/**
 * Invitation and reset links as an attacker would try them: read back from the database after the
 * mail has gone, an older link after a newer one, a link used twice, a link past its time. Each is
 * tried through the real server actions where one exists.
 */
import { existsSync, mkdtempSync, readFileSync } from "node:fs";
import { join } from "node:path";
import { eq, sql } from "drizzle-orm";
import { afterEach, beforeAll, describe, expect, onTestFinished, test } from "vitest";
import { getDb } from "@/db";
import { authTokens, mailAttempts, mailSecrets, outbox, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { AppError } from "@/lib/auth/errors";
import { hashPassword } from "@/lib/auth/password";
import { hashToken, newId, newToken } from "@/lib/auth/tokens";
import { setClock } from "@/lib/clock";
import { startFakeSmtp } from "@/lib/mail/fake-smtp";
import { readMailbox, type MailboxMessage } from "@/lib/mail/mailbox";
import { listOutbox, queueMail } from "@/lib/mail/outbox";
import { deliverDue } from "@/lib/mail/sender";
import { createMailTransport, type MailTransport } from "@/lib/mail/transport";
import {
  acceptInvite,
  deactivateUser,
  findToken,
  INVITE_TTL_HOURS,
  inviteUser,
  reactivateUser,
  requestPasswordReset,
  RESET_TTL_MINUTES,
  resetPassword,
} from "@/lib/users/queries";
import { requestResetAction, resetPasswordAction } from "@/app/(auth)/reset/actions";
import { acceptInviteAction } from "@/app/(auth)/invite/[token]/actions";
import { RedirectSignal, request } from "../setup/next-request";

const db = () => getDb();
// The mocked request's host (tests/setup/next-request.ts): the base of links the actions make.
const BASE_URL = "http://localhost:3000";
const PASSWORD = "quartersawn-oak-12";
let admin: { id: string; name: string };

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const [a] = await db().select().from(users).where(eq(users.email, "admin@demo.twinleaf.test"));
  admin = { id: a!.id, name: a!.name };
});

afterEach(() => {
  setClock(null);
  request.sessionId = null;
  request.cookieSets = [];
  request.setCookieHeaders = [];
});

let serial = 0;
async function makeUser(name: string) {
  const id = newId();
  const email = `${name.toLowerCase().replace(/\W+/g, ".")}.${++serial}@workshop.twinleaf.test`;
  await db().insert(users).values({ id, email, name, passwordHash: await hashPassword(PASSWORD) });
  return { id, email, name };
}

function form(values: Record<string, string>) {
  const fd = new FormData();
  for (const [k, v] of Object.entries(values)) fd.set(k, v);
  return fd;
}

/** Delivers everything due through a fake SMTP server of this test's own; returns what arrived. */
async function deliver(label: string) {
  const dir = mkdtempSync(join(process.env.TWINLEAF_TEST_DIR!, `${label}-`));
  const smtp = await startFakeSmtp({ port: 0, dir });
  onTestFinished(() => smtp.close());
  const transport = createMailTransport({ smtp: { host: "127.0.0.1", port: smtp.port, secure: false }, from: "Twinleaf <no-reply@twinleaf.test>", mailboxDir: dir });
  const result = await deliverDue(db(), transport);
  return { result, inbox: await readMailbox(dir) };
}

/** The tokens in the links to `path` of every message to `to`, oldest first. */
function tokensIn(inbox: MailboxMessage[], to: string, path: "invite" | "reset"): string[] {
  return inbox
    .filter((m) => m.to === to)
    .sort((a, b) => a.receivedAt.getTime() - b.receivedAt.getTime() || a.id.localeCompare(b.id))
    .map((m) => new RegExp(`${BASE_URL}/${path}/([A-Za-z0-9_-]+)`).exec(m.text)?.[1] ?? "no link");
}

/** Every value of every row of every table, as one text. */
async function everythingStored(): Promise<string> {
  const tables = await db().all<{ name: string }>(sql`SELECT name FROM sqlite_master WHERE type = 'table'`);
  const parts: string[] = [];
  for (const { name } of tables) parts.push(JSON.stringify(await db().all(sql.raw(`SELECT * FROM "${name.replace(/"/g, '""')}"`))));
  return parts.join("\n");
}

/** The database's bytes on disk (file and write-ahead log), after folding the log into the file. */
async function fileBytes(): Promise<Buffer> {
  await db().run(sql`PRAGMA wal_checkpoint(TRUNCATE)`);
  const path = process.env.DATABASE_URL!.replace(/^file:/, "");
  return Buffer.concat([readFileSync(path), existsSync(`${path}-wal`) ? readFileSync(`${path}-wal`) : Buffer.alloc(0)]);
}

const outboxTo = async (to: string) => db().select().from(outbox).where(eq(outbox.to, to));
const secretsOf = async (outboxId: number) => (await db().select().from(mailSecrets).where(eq(mailSecrets.outboxId, outboxId)))[0] ?? null;

describe("no usable link stays readable in the database", () => {
  test.each<[string, "invite" | "reset", (email: string) => Promise<string>]>([
    [
      "an invitation",
      "invite",
      async (email) => {
        await inviteUser(db(), { email, name: "Perrin Gale", roles: ["lab"], actor: admin, baseUrl: BASE_URL });
        return email;
      },
    ],
    [
      "a password reset, asked for through the form's action",
      "reset",
      async () => {
        const u = await makeUser("Maren Holt");
        expect(await requestResetAction(undefined, form({ email: u.email }))).toMatchObject({ ok: true });
        return u.email;
      },
    ],
  ])("%s: the outbox keeps a marker, the token waits apart and is deleted once the mail is sent", async (_label, path, make) => {
    const to = await make(`perrin.gale.${++serial}@workshop.twinleaf.test`);
    const [queued] = await outboxTo(to);
    const secrets = await secretsOf(queued!.id);
    const [[marker, token]] = Object.entries(secrets!.values) as [[string, string]];
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    expect(queued!.text).not.toContain(token);
    expect(queued!.html).not.toContain(token);
    expect(queued!.text).toContain(`${BASE_URL}/${path}/${marker}`);
    expect(queued!.html).toContain(`href="${BASE_URL}/${path}/${marker}"`);

    const { inbox } = await deliver(path);
    // The mail that arrived carries the real link…
    expect(tokensIn(inbox, to, path)).toEqual([token]);
    expect(inbox.find((m) => m.to === to)!.html).toContain(`href="${BASE_URL}/${path}/${token}"`);
    // …and the database no longer holds it anywhere, not even in the file's free space.
    expect(await secretsOf(queued!.id)).toBeNull();
    expect(await everythingStored()).not.toContain(token);
    expect((await fileBytes()).includes(token)).toBe(false);
    // The link still works for the one who received it.
    expect(await findToken(db(), token, path)).not.toBeNull();
  });

  test("a message given up after its last failed try loses its secret with that try", async () => {
    const u = await makeUser("Tamsin Rook");
    await requestPasswordReset(db(), { email: u.email, baseUrl: BASE_URL, address: "127.0.0.1" });
    const [queued] = await outboxTo(u.email);
    const down: MailTransport = {
      sendMail: async () => {
        throw new Error("connection refused");
      },
    };
    const t0 = Date.now();
    // Two tries allowed: the first failure keeps the secret for the retry, the second settles it.
    await deliverDue(db(), down, { maxAttempts: 2, now: new Date(t0) });
    expect(await secretsOf(queued!.id)).not.toBeNull();
    await deliverDue(db(), down, { maxAttempts: 2, now: new Date(t0 + 3600_000) });
    expect(await secretsOf(queued!.id)).toBeNull();
    const [entry] = (await listOutbox(db(), { maxAttempts: 2 })).filter((e) => e.id === queued!.id);
    expect(entry?.status).toBe("failed");
  });

  test("secrets of a message already settled some other way are deleted at the sender's next run", async () => {
    const id = await queueMail(db(), { to: "settled@workshop.twinleaf.test", subject: "Settled", text: `Open ${BASE_URL}/reset/${"s".repeat(43)}`, secrets: ["s".repeat(43)] });
    expect(await secretsOf(id)).not.toBeNull();
    // As if another sender had delivered it and stopped before tidying up.
    await db().insert(mailAttempts).values({ outboxId: id, at: new Date(), ok: true, detail: "<elsewhere@twinleaf.test>" });
    const sink: MailTransport = { sendMail: async () => ({ messageId: "<unused@twinleaf.test>" }) };
    await deliverDue(db(), sink);
    expect(await secretsOf(id)).toBeNull();
  });

  test("a message whose secret has gone is not sent with a marker in place of its link", async () => {
    const id = await queueMail(db(), { to: "lost@workshop.twinleaf.test", subject: "Lost", text: `Open ${BASE_URL}/reset/${"L".repeat(43)}`, secrets: ["L".repeat(43)] });
    await db().delete(mailSecrets).where(eq(mailSecrets.outboxId, id));
    const sent: string[] = [];
    const sink: MailTransport = { sendMail: async (m) => (sent.push(String(m.to)), { messageId: "<x@twinleaf.test>" }) };
    await deliverDue(db(), sink);
    expect(sent).not.toContain("lost@workshop.twinleaf.test");
    const [attempt] = await db().select().from(mailAttempts).where(eq(mailAttempts.outboxId, id));
    expect(attempt).toMatchObject({ ok: false, detail: expect.stringMatching(/no longer kept/) });
  });

  test.each<[string, string[], RegExp]>([
    ["a secret that is not in the text", ["a".repeat(43)], /every secret must appear in the text/],
    ["a secret that is not URL-safe", ["<b>bold</b>-and-more"], /URL-safe token/],
    ["a secret too short to be a token", ["abc"], /URL-safe token/],
  ])("queueMail refuses %s and queues nothing", async (_label, secrets, message) => {
    const before = (await db().select({ n: sql<number>`count(*)` }).from(outbox))[0]!.n;
    await expect(queueMail(db(), { to: "refused@workshop.twinleaf.test", subject: "x", text: "Hello <b>bold</b>-and-more abc", secrets })).rejects.toThrow(message);
    expect((await db().select({ n: sql<number>`count(*)` }).from(outbox))[0]!.n).toBe(before);
  });
});

describe("a link works once, alone and for a short time", () => {
  test("an older reset link fails once a newer one has been asked for, and the newer one works", async () => {
    const u = await makeUser("Idris Fenwick");
    await requestResetAction(undefined, form({ email: u.email }));
    await requestResetAction(undefined, form({ email: u.email }));
    const [older, newer] = tokensIn((await deliver("two-resets")).inbox, u.email, "reset");
    expect(older).not.toBe(newer);

    const refused = await resetPasswordAction(undefined, form({ token: older!, password: "never-set-this-1", confirm: "never-set-this-1" }));
    expect(refused).toMatchObject({ ok: false, status: 410 });
    expect(request.cookieSets).toEqual([]);

    await expect(resetPasswordAction(undefined, form({ token: newer!, password: "walnut-burl-2024", confirm: "walnut-burl-2024" }))).rejects.toBeInstanceOf(RedirectSignal);
    // Spending the newer one does not bring the older one back.
    expect(await resetPasswordAction(undefined, form({ token: older!, password: "never-set-this-1", confirm: "never-set-this-1" }))).toMatchObject({ ok: false, status: 410 });
  });

  test("a used reset link fails the second time, through the action, and changes nothing", async () => {
    const u = await makeUser("Saskia Brandt");
    await requestPasswordReset(db(), { email: u.email, baseUrl: BASE_URL, address: "127.0.0.1" });
    const [token] = tokensIn((await deliver("used")).inbox, u.email, "reset");
    await expect(resetPasswordAction(undefined, form({ token: token!, password: "first-new-pass-1", confirm: "first-new-pass-1" }))).rejects.toBeInstanceOf(RedirectSignal);
    const [before] = await db().select().from(users).where(eq(users.id, u.id));
    request.cookieSets = [];
    const again = await resetPasswordAction(undefined, form({ token: token!, password: "second-new-pass-2", confirm: "second-new-pass-2" }));
    expect(again).toMatchObject({ ok: false, status: 410 });
    expect(request.cookieSets).toEqual([]);
    const [after] = await db().select().from(users).where(eq(users.id, u.id));
    expect(after!.passwordHash).toBe(before!.passwordHash);
  });

  test("a used invitation link fails the second time, through the action", async () => {
    const email = `joiner.${++serial}@workshop.twinleaf.test`;
    await inviteUser(db(), { email, name: "Joss Arden", roles: ["veneer"], actor: admin, baseUrl: BASE_URL });
    const [token] = tokensIn((await deliver("invite-used")).inbox, email, "invite");
    await expect(acceptInviteAction(undefined, form({ token: token!, password: PASSWORD, confirm: PASSWORD }))).rejects.toBeInstanceOf(RedirectSignal);
    expect(await acceptInviteAction(undefined, form({ token: token!, password: "taken-over-123", confirm: "taken-over-123" }))).toMatchObject({ ok: false, status: 410 });
  });

  test("spending one link ends every other open link of the user", async () => {
    // Issuing already revokes older links; two open at once can only come from elsewhere (an
    // older version's rows), so they are written directly here.
    const u = await makeUser("Oriel Vance");
    const [a, b] = [newToken(), newToken()];
    const expiresAt = new Date(Date.now() + 3600_000);
    await db().insert(authTokens).values([
      { id: newId(), userId: u.id, purpose: "reset", tokenHash: hashToken(a), expiresAt },
      { id: newId(), userId: u.id, purpose: "reset", tokenHash: hashToken(b), expiresAt },
    ]);
    await resetPassword(db(), { token: a, password: "sycamore-figure-9" });
    expect(await findToken(db(), b, "reset")).toBeNull();
    await expect(resetPassword(db(), { token: b, password: "sycamore-figure-10" })).rejects.toMatchObject({ status: 410 });
  });

  // The lifetimes are the product's own choice, stated in the README: a reset link is used at once,
  // an invitation may wait over a weekend. A link is good until, not at, its expiry.
  test.each<[string, "invite" | "reset", number]>([
    ["a reset link", "reset", RESET_TTL_MINUTES * 60_000],
    ["an invitation link", "invite", INVITE_TTL_HOURS * 3600_000],
  ])("%s works until its lifetime is up, and not from then on", async (_label, path, ttlMs) => {
    const t0 = new Date("2026-02-02T09:00:00.000Z");
    setClock(t0);
    let email: string;
    if (path === "reset") {
      email = (await makeUser("Ilka Marsh")).email;
      await requestPasswordReset(db(), { email, baseUrl: BASE_URL, address: "127.0.0.1" });
    } else {
      email = `late.joiner.${++serial}@workshop.twinleaf.test`;
      await inviteUser(db(), { email, name: "Late Joiner", roles: ["lab"], actor: admin, baseUrl: BASE_URL });
    }
    const [token] = tokensIn((await deliver(`ttl-${path}`)).inbox, email, path);
    setClock(new Date(t0.getTime() + ttlMs - 1));
    expect(await findToken(db(), token!, path)).not.toBeNull();
    setClock(new Date(t0.getTime() + ttlMs));
    expect(await findToken(db(), token!, path)).toBeNull();
    const spend = path === "reset" ? resetPassword : acceptInvite;
    await expect(spend(db(), { token: token!, password: PASSWORD })).rejects.toBeInstanceOf(AppError);
  });

  test("deactivating a user revokes their open links, so reactivating them does not bring the links back", async () => {
    const u = await makeUser("Corvin Stade");
    await requestPasswordReset(db(), { email: u.email, baseUrl: BASE_URL, address: "127.0.0.1" });
    const [token] = tokensIn((await deliver("deactivated")).inbox, u.email, "reset");
    await deactivateUser(db(), { userId: u.id, actor: admin });
    await reactivateUser(db(), { userId: u.id, actor: admin });
    expect(await findToken(db(), token!, "reset")).toBeNull();
  });
});
