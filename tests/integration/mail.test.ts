import { mkdtempSync } from "node:fs";
import { join } from "node:path";
import { eq } from "drizzle-orm";
import { afterAll, afterEach, beforeAll, beforeEach, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { events, mailAttempts, outbox } from "@/db/schema";
import { appendEvent } from "@/lib/events/queries";
import type { MailConfig } from "@/lib/mail/config";
import { startFakeSmtp, type FakeSmtp } from "@/lib/mail/fake-smtp";
import { readMailbox, readMessage } from "@/lib/mail/mailbox";
import { listOutbox, queueMail, retryDelayMs } from "@/lib/mail/outbox";
import { deliverDue, startMailSender } from "@/lib/mail/sender";
import { inviteMail, resetMail } from "@/lib/mail/templates";
import { createMailTransport, type MailTransport } from "@/lib/mail/transport";

const testDir = () => process.env.TWINLEAF_TEST_DIR!;
const freshDir = (label: string) => mkdtempSync(join(testDir(), `${label}-`));

// Demo recipients are invented; the domain is reserved for tests.
const configFor = (port: number): MailConfig => ({
  smtp: { host: "127.0.0.1", port, secure: false, user: "sender", password: "not-a-real-secret" },
  from: "Twinleaf <no-reply@twinleaf.test>",
  mailboxDir: "unused",
});

const attemptsOf = (id: number) => getDb().select().from(mailAttempts).where(eq(mailAttempts.outboxId, id)).orderBy(mailAttempts.id);

// Tests in this file share one database. Before each delivery test every message still
// waiting is settled with a sink, so each test's counts concern its own messages only.
async function settleEverything() {
  const sink: MailTransport = { sendMail: async () => ({ messageId: "<settled@twinleaf.test>" }) };
  await deliverDue(getDb(), sink, { now: new Date(Date.now() + 365 * 24 * 3600_000), batch: 1000 });
}

describe("queueMail joins the transaction of the event that causes it", () => {
  const event = (subjectId: string) => ({
    actorId: null, station: "admin" as const, type: "user.invited" as const, subjectKind: "user", subjectId,
  });

  test("rolled back: neither the event nor the mail is there", async () => {
    const db = getDb();
    await expect(
      db.transaction(async (tx) => {
        const eventId = await appendEvent(tx, event("u-rollback"));
        await queueMail(tx, { to: "ada.rollback@twinleaf.test", subject: "Rolled back", text: "never sent", eventId });
        throw new Error("the change failed after the mail was queued");
      }),
    ).rejects.toThrow(/change failed/);
    expect(await db.select().from(events).where(eq(events.subjectId, "u-rollback"))).toEqual([]);
    expect(await db.select().from(outbox).where(eq(outbox.to, "ada.rollback@twinleaf.test"))).toEqual([]);
  });

  test("committed: both are there and the mail names its event", async () => {
    const db = getDb();
    const { eventId, mailId } = await db.transaction(async (tx) => {
      const eventId = await appendEvent(tx, event("u-commit"));
      const mailId = await queueMail(tx, { to: "ada.commit@twinleaf.test", subject: "Committed", text: "to be sent", eventId });
      return { eventId, mailId };
    });
    const [ev] = await db.select().from(events).where(eq(events.subjectId, "u-commit"));
    const [mail] = await db.select().from(outbox).where(eq(outbox.id, mailId));
    expect(ev?.id).toBe(eventId);
    expect(mail).toMatchObject({ to: "ada.commit@twinleaf.test", subject: "Committed", eventId });
    const [entry] = (await listOutbox(db)).filter((e) => e.id === mailId);
    expect(entry).toMatchObject({ status: "pending", attempts: 0, lastError: null, sentAt: null });
  });

  test("a recipient with a line break is refused", async () => {
    await expect(queueMail(getDb(), { to: "a@twinleaf.test\r\nBcc: b@twinleaf.test", subject: "x", text: "x" })).rejects.toThrow(/one line/);
  });
});

describe("deliverDue through the fake SMTP server", () => {
  let smtp: FakeSmtp;
  let mailbox: string;

  beforeEach(async () => {
    await settleEverything();
    mailbox = freshDir("mailbox");
    smtp = await startFakeSmtp({ port: 0, dir: mailbox });
  });
  afterEach(async () => {
    await smtp.close();
  });

  test("a queued message arrives, is recorded as sent and is not sent twice", async () => {
    const db = getDb();
    expect(smtp.port).toBeGreaterThan(0);
    const content = resetMail({ name: "Wren Halloway", link: "https://twinleaf.test/reset/abc", expiresMinutes: 30 });
    const id = await queueMail(db, { to: "wren@twinleaf.test", ...content });
    const transport = createMailTransport(configFor(smtp.port));

    expect(await deliverDue(db, transport)).toEqual({ sent: 1, failed: 0 });

    const inbox = await readMailbox(mailbox);
    expect(inbox).toHaveLength(1);
    const got = inbox[0]!;
    expect(got.to).toBe("wren@twinleaf.test");
    expect(got.from).toContain("no-reply@twinleaf.test");
    expect(got.subject).toBe(content.subject);
    expect(got.text).toContain("https://twinleaf.test/reset/abc");
    expect(got.text).toContain("30 minutes");
    expect(got.html).toContain('href="https://twinleaf.test/reset/abc"');
    expect(await readMessage(mailbox, got.id)).toEqual(got);

    const attempts = await attemptsOf(id);
    expect(attempts).toHaveLength(1);
    expect(attempts[0]!.ok).toBe(true);
    expect(attempts[0]!.detail).toMatch(/^<.+@.+>$/);
    const [entry] = (await listOutbox(db)).filter((e) => e.id === id);
    expect(entry).toMatchObject({ status: "sent", attempts: 1, lastError: null });
    expect(entry!.sentAt).toEqual(attempts[0]!.at);

    expect(await deliverDue(db, transport)).toEqual({ sent: 0, failed: 0 });
    expect(await readMailbox(mailbox)).toHaveLength(1);
    expect(await attemptsOf(id)).toHaveLength(1);
  });

  test("a failed try is recorded, waits out its backoff, and is delivered once the server is up", async () => {
    const db = getDb();
    // A port that was just free and is closed again: connecting is refused.
    const gone = await startFakeSmtp({ port: 0, dir: freshDir("gone") });
    await gone.close();
    const down = createMailTransport(configFor(gone.port));
    const up = createMailTransport(configFor(smtp.port));
    const id = await queueMail(db, { to: "otto@twinleaf.test", subject: "Your pair has shipped", text: "It left the workshop today." });
    const t0 = new Date();
    const at = (ms: number) => new Date(t0.getTime() + ms);

    expect(await deliverDue(db, down, { now: t0 })).toEqual({ sent: 0, failed: 1 });
    let attempts = await attemptsOf(id);
    expect(attempts.map((a) => a.ok)).toEqual([false]);
    expect(attempts[0]!.detail).toMatch(/ECONNREFUSED|connect/i);
    expect(attempts[0]!.detail).not.toContain("not-a-real-secret");
    let [entry] = (await listOutbox(db)).filter((e) => e.id === id);
    expect(entry).toMatchObject({ status: "pending", attempts: 1, sentAt: null });
    expect(entry!.lastError).toBe(attempts[0]!.detail);
    expect(entry!.nextAttemptAt).toEqual(at(30_000));

    // First wait is 30 s: a run just before it leaves the message alone, even with the server up.
    expect(await deliverDue(db, up, { now: at(29_999) })).toEqual({ sent: 0, failed: 0 });
    expect(await readMailbox(mailbox)).toEqual([]);

    // Second failure at exactly 30 s; the next wait doubles to 60 s.
    expect(await deliverDue(db, down, { now: at(30_000) })).toEqual({ sent: 0, failed: 1 });
    expect(await deliverDue(db, up, { now: at(30_000 + 59_999) })).toEqual({ sent: 0, failed: 0 });
    expect(await readMailbox(mailbox)).toEqual([]);

    expect(await deliverDue(db, up, { now: at(90_000) })).toEqual({ sent: 1, failed: 0 });
    const inbox = await readMailbox(mailbox);
    expect(inbox.map((m) => [m.to, m.subject, m.text.trim()])).toEqual([
      ["otto@twinleaf.test", "Your pair has shipped", "It left the workshop today."],
    ]);
    attempts = await attemptsOf(id);
    expect(attempts.map((a) => a.ok)).toEqual([false, false, true]);
    [entry] = (await listOutbox(db)).filter((e) => e.id === id);
    expect(entry).toMatchObject({ status: "sent", attempts: 3, nextAttemptAt: null });
    expect(entry!.lastError).toBe(attempts[1]!.detail);
  });

  test("after maxAttempts failures a message is failed and never tried again", async () => {
    const db = getDb();
    const refusing: MailTransport = { sendMail: () => Promise.reject(Object.assign(new Error("mailbox unavailable"), { code: "EENVELOPE" })) };
    const id = await queueMail(db, { to: "nobody@twinleaf.test", subject: "Lost", text: "..." });
    const t0 = Date.now();

    expect(await deliverDue(db, refusing, { now: new Date(t0), maxAttempts: 2 })).toEqual({ sent: 0, failed: 1 });
    expect(await deliverDue(db, refusing, { now: new Date(t0 + 30_000), maxAttempts: 2 })).toEqual({ sent: 0, failed: 1 });
    const later = new Date(t0 + 24 * 3600_000);
    expect(await deliverDue(db, createMailTransport(configFor(smtp.port)), { now: later, maxAttempts: 2 })).toEqual({ sent: 0, failed: 0 });

    const [entry] = (await listOutbox(db, { maxAttempts: 2 })).filter((e) => e.id === id);
    expect(entry).toMatchObject({ status: "failed", attempts: 2, lastError: "EENVELOPE: mailbox unavailable", nextAttemptAt: null });
    expect(await readMailbox(mailbox)).toEqual([]);
  });

  // The due test runs in SQL; this checks it against retryDelayMs, including past the one-hour cap.
  test.each([1, 6, 7, 8, 12])("after %i failures the query waits exactly retryDelayMs", async (failures) => {
    const db = getDb();
    const id = await queueMail(db, { to: "backoff@twinleaf.test", subject: `Backoff ${failures}`, text: "." });
    const last = Date.now();
    for (let n = failures; n >= 1; n--) {
      await db.insert(mailAttempts).values({ outboxId: id, at: new Date(last - n * 1000 + 1000), ok: false, detail: "earlier failure" });
    }
    const sink: MailTransport = { sendMail: async () => ({ messageId: "<ok@twinleaf.test>" }) };
    const wait = retryDelayMs(failures);
    expect(await deliverDue(db, sink, { now: new Date(last + wait - 1), maxAttempts: 20 })).toEqual({ sent: 0, failed: 0 });
    expect(await deliverDue(db, sink, { now: new Date(last + wait), maxAttempts: 20 })).toEqual({ sent: 1, failed: 0 });
  });

  test("batch limits how many messages one run sends, oldest first", async () => {
    const db = getDb();
    const first = await queueMail(db, { to: "one@twinleaf.test", subject: "First", text: "1" });
    const second = await queueMail(db, { to: "two@twinleaf.test", subject: "Second", text: "2" });
    const transport = createMailTransport(configFor(smtp.port));
    expect(await deliverDue(db, transport, { batch: 1 })).toEqual({ sent: 1, failed: 0 });
    expect((await attemptsOf(first)).length).toBe(1);
    expect((await attemptsOf(second)).length).toBe(0);
    expect(await deliverDue(db, transport, { batch: 1 })).toEqual({ sent: 1, failed: 0 });
    expect((await readMailbox(mailbox)).map((m) => m.subject)).toEqual(["Second", "First"]);
  });

  test("startMailSender delivers on its timer and a second start reuses the first timer", async () => {
    const saved = process.env.SMTP_URL;
    process.env.SMTP_URL = `smtp://sender:pw@127.0.0.1:${smtp.port}`;
    const stop = startMailSender({ intervalMs: 20 });
    try {
      expect(startMailSender({ intervalMs: 20 })).toBe(stop);
      const id = await queueMail(getDb(), { to: "timer@twinleaf.test", subject: "On the timer", text: "sent by the loop" });
      const deadline = Date.now() + 5000;
      while ((await readMailbox(mailbox)).length === 0 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 20));
      expect((await readMailbox(mailbox)).map((m) => m.subject)).toEqual(["On the timer"]);
      expect((await attemptsOf(id)).map((a) => a.ok)).toEqual([true]);
    } finally {
      await stop();
      if (saved === undefined) delete process.env.SMTP_URL;
      else process.env.SMTP_URL = saved;
    }
    // Stopped: a new start makes a new timer rather than handing back the old stop function.
    const again = startMailSender({ intervalMs: 1000 });
    expect(again).not.toBe(stop);
    await again();
  });
});

describe("templates", () => {
  test("inputs are escaped in the HTML and kept readable in the text", () => {
    const m = inviteMail({
      name: '<img src=x onerror="alert(1)">',
      invitedBy: "Mara & <b>Sons</b>",
      link: 'https://twinleaf.test/invite?t=a"b&c=<d>',
      expiresHours: 48,
    });
    expect(m.html).not.toContain("<img");
    expect(m.html).not.toContain("<b>");
    expect(m.html).toContain("&lt;img src=x onerror=&quot;alert(1)&quot;&gt;");
    expect(m.html).toContain("Mara &amp; &lt;b&gt;Sons&lt;/b&gt;");
    // The URL parser percent-encodes the quote and brackets; the & is escaped for the attribute.
    expect(m.html).toContain('href="https://twinleaf.test/invite?t=a%22b&amp;c=%3Cd%3E"');
    expect(m.text).toContain('Hello <img src=x onerror="alert(1)">,');
    expect(m.text).toContain("48 hours");
    expect(m.text.trimEnd().endsWith("Twinleaf")).toBe(true);
  });

  test("a link that is not http(s) is refused", () => {
    expect(() => resetMail({ name: "Wren", link: "javascript:alert(1)", expiresMinutes: 30 })).toThrow(/http/);
    expect(() => inviteMail({ name: "Wren", link: "not a url", invitedBy: "Ida", expiresHours: 1 })).toThrow(/URL/);
  });

  test("one hour and one minute are singular", () => {
    expect(inviteMail({ name: "W", link: "https://twinleaf.test/i", invitedBy: "I", expiresHours: 1 }).text).toContain("expires in 1 hour.");
    expect(resetMail({ name: "W", link: "https://twinleaf.test/r", expiresMinutes: 1 }).text).toContain("expires in 1 minute.");
  });
});

describe("the mailbox reader", () => {
  let smtp: FakeSmtp;
  let mailbox: string;
  beforeAll(async () => {
    mailbox = freshDir("reader");
    smtp = await startFakeSmtp({ port: 0, dir: mailbox });
    const transport = createMailTransport(configFor(smtp.port));
    for (const n of [1, 2, 3]) await transport.sendMail({ to: `r${n}@twinleaf.test`, subject: `Note ${n}`, text: `body ${n}` });
  });
  afterAll(async () => {
    await smtp.close();
  });

  test("lists newest first and honours the limit", async () => {
    expect((await readMailbox(mailbox)).map((m) => m.subject)).toEqual(["Note 3", "Note 2", "Note 1"]);
    expect((await readMailbox(mailbox, { limit: 2 })).map((m) => m.to)).toEqual(["r3@twinleaf.test", "r2@twinleaf.test"]);
  });

  test("a folder that does not exist is an empty mailbox", async () => {
    expect(await readMailbox(join(testDir(), "no-such-folder"))).toEqual([]);
  });

  test.each(["../x", "..", "../reader/x.eml", "/etc/passwd", "sub/x.eml", ".hidden.eml", "x.eml\0", "..\\x.eml"])(
    "readMessage refuses %j",
    async (id) => {
      await expect(readMessage(mailbox, id)).rejects.toThrow(/not a message id/);
    },
  );

  test("an unknown but well-formed id is null", async () => {
    expect(await readMessage(mailbox, "0000000000000-000000-1.eml")).toBeNull();
  });
});
