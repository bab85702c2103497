import { mkdtempSync } from "node:fs";
import { join } from "node:path";
import type { Client } from "@libsql/client";
import { eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { openDb, type Db } from "@/db";
import { mailAttempts, mailClaims, mailSecrets } from "@/db/schema";
import { startFakeSmtp, type FakeSmtp } from "@/lib/mail/fake-smtp";
import { readMailbox } from "@/lib/mail/mailbox";
import { queueMail } from "@/lib/mail/outbox";
import { CLAIM_MS, deliverDue } from "@/lib/mail/sender";
import { createMailTransport } from "@/lib/mail/transport";

// Two clients on one database file stand for two server processes, each with its own sender
// and its own SMTP connection, delivering to one stand-in server.
const url = () => process.env.DATABASE_URL!;
let a: { client: Client; db: Db };
let b: { client: Client; db: Db };
let smtp: FakeSmtp;
let mailbox: string;

const transportFor = (port: number) =>
  createMailTransport({
    smtp: { host: "127.0.0.1", port, secure: false, user: "sender", password: "not-a-real-secret" },
    from: "Twinleaf <no-reply@twinleaf.test>",
    mailboxDir: "unused",
  });

beforeAll(async () => {
  a = openDb(url());
  b = openDb(url());
  mailbox = mkdtempSync(join(process.env.TWINLEAF_TEST_DIR!, "two-senders-"));
  smtp = await startFakeSmtp({ port: 0, dir: mailbox });
});
afterAll(async () => {
  a.client.close();
  b.client.close();
  await smtp.close();
});

/** Queues `n` messages, every third with a one-time link, and returns their ids and subjects. */
async function queue(db: Db, round: number, n: number) {
  const out: { id: number; subject: string }[] = [];
  for (let i = 0; i < n; i++) {
    const subject = `Round ${round}, message ${i}`;
    const secret = `link-token-${round}-${i}-abcdefghijklmnop`;
    const id = await db.transaction((tx) =>
      queueMail(tx, { to: `reader.${round}.${i}@twinleaf.test`, subject, text: i % 3 === 0 ? `Open https://twinleaf.test/x/${secret}` : "Hello", ...(i % 3 === 0 ? { secrets: [secret] } : {}) }),
    );
    out.push({ id, subject });
  }
  return out;
}

describe("two processes running the sender deliver each message once", () => {
  test("ten rounds of twelve messages, four sender runs at once on two processes: every message arrives exactly once", async () => {
    const ta = transportFor(smtp.port);
    const tb = transportFor(smtp.port);
    const queued: { id: number; subject: string }[] = [];
    try {
      for (let round = 0; round < 10; round++) {
        queued.push(...(await queue(round % 2 ? a.db : b.db, round, 12)));
        const runs = await Promise.all([deliverDue(a.db, ta), deliverDue(b.db, tb), deliverDue(b.db, tb), deliverDue(a.db, ta)]);
        // Together the runs sent this round's twelve: none twice, none left behind.
        expect(runs.reduce((n, r) => n + r.sent, 0)).toBe(12);
        expect(runs.reduce((n, r) => n + r.failed, 0)).toBe(0);
      }
    } finally {
      ta.close();
      tb.close();
    }
    const arrived = (await readMailbox(mailbox, { limit: 1000 })).map((m) => m.subject).sort();
    expect(arrived).toEqual(queued.map((q) => q.subject).sort());
    const ids = queued.map((q) => q.id);
    // One ok try each, every claim let go, every one-time link forgotten.
    const tries = await a.db.select({ id: mailAttempts.outboxId, ok: mailAttempts.ok }).from(mailAttempts).where(inArray(mailAttempts.outboxId, ids));
    expect(tries).toHaveLength(ids.length);
    expect(tries.every((t) => t.ok)).toBe(true);
    expect(await a.db.select().from(mailClaims).where(inArray(mailClaims.outboxId, ids))).toEqual([]);
    expect(await a.db.select().from(mailSecrets).where(inArray(mailSecrets.outboxId, ids))).toEqual([]);
  });

  test.each([
    // A claim another run holds keeps the message back until it ends (CLAIM_MS after it was taken).
    ["held by a live claim of another run", 60_000, 0],
    ["left by a run that died: the claim has ended", -1, 1],
  ])("a message %s", async (_what, untilFromNow, expectSent) => {
    const [m] = await queue(a.db, 100 + expectSent, 1);
    const now = new Date();
    await a.db.insert(mailClaims).values({ outboxId: m!.id, holder: "another-run", until: new Date(now.getTime() + untilFromNow) });
    const sink = { sendMail: async () => ({ messageId: "<sink@twinleaf.test>" }) };
    const r = await deliverDue(b.db, sink, { now });
    expect(r.sent).toBe(expectSent);
    const claims = await a.db.select().from(mailClaims).where(eq(mailClaims.outboxId, m!.id));
    expect(claims.map((c) => c.holder)).toEqual(expectSent ? [] : ["another-run"]);
    expect(CLAIM_MS).toBeGreaterThan(10 * 60_000);
  });
});
