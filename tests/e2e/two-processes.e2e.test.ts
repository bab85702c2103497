import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { and, eq, inArray, sql } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb, type Db } from "@/db";
import { migrateDatabase } from "@/db/migrate";
import { limitHits, mailAttempts, mailClaims, outbox, serviceCases, users } from "@/db/schema";
import { startSession } from "@/lib/auth/sessions";
import { startFakeSmtp, type FakeSmtp } from "@/lib/mail/fake-smtp";
import { readMailbox } from "@/lib/mail/mailbox";
import { queueMail } from "@/lib/mail/outbox";
import { paths } from "@/lib/paths";
import { startNextApp, testAppEnv, type NextApp } from "../setup/app-server";
import { launchBrowser, newPage } from "./browser-helpers";

// Two `next start` processes of the one production build, on one database file, driven at once.
// They run on a copy of the seeded demo (VACUUM INTO, a consistent snapshot), so what they write
// leaves the shared e2e server's register as the other files expect it; and with their own
// stand-in SMTP server and a sender that runs every 100 ms in each.
const dir = mkdtempSync(join(tmpdir(), "twinleaf-two-"));
const databaseUrl = `file:${join(dir, "two.db")}`;
const mailboxDir = join(dir, "mailbox");
let smtp: FakeSmtp;
let db: Db;
let closeDb: () => void;
const servers: NextApp[] = [];
const bases: string[] = [];
let browser: Browser;

/** One more server of the build on the copy, with its own sender every 100 ms and the shared stand-in payments. */
async function startApp(): Promise<string> {
  const app = await startNextApp(testAppEnv({ dir, databaseUrl, smtpPort: smtp.port, paymentsUrl: inject("paymentsUrl"), sendIntervalMs: 100 }));
  servers.push(app);
  return app.baseUrl;
}

beforeAll(async () => {
  const shared = openDb(inject("databaseUrl"));
  await shared.client.execute({ sql: "VACUUM INTO ?", args: [join(dir, "two.db")] });
  shared.client.close();
  // A copy made by VACUUM INTO is not in WAL mode; migrating it sets WAL, as after a restore.
  await migrateDatabase(databaseUrl);
  const own = openDb(databaseUrl);
  db = own.db;
  closeDb = () => own.client.close();
  // The copy starts with no counted tries, whatever earlier files did on the shared server.
  await db.delete(limitHits);
  smtp = await startFakeSmtp({ port: 0, dir: mailboxDir });
  bases.push(...(await Promise.all([startApp(), startApp()])));
  browser = await launchBrowser();
});

afterAll(async () => {
  await browser?.close();
  await Promise.all(servers.map((s) => s.stop()));
  await smtp?.close();
  closeDb?.();
});

/** Each of `n` requests goes to the two processes in turn. */
const across = <T,>(n: number, send: (base: string, i: number) => Promise<T>) => Promise.all(Array.from({ length: n }, (_, i) => send(bases[i % 2]!, i)));

async function sessionCookie(email: string): Promise<string> {
  const [u] = await db.select({ id: users.id }).from(users).where(eq(users.email, email));
  const { session } = await startSession(u!.id, db);
  return `twinleaf_session=${session.id}`;
}

describe("two app processes on one database file", () => {
  test("wrong passwords for one account, sent at once to both processes, are checked exactly five times", async () => {
    // The sign-in form's server-action post, captured once through the browser and replayed as a script would.
    const page = await newPage(browser);
    await page.goto(`${bases[0]}/sign-in`);
    await page.getByLabel("E-mail").fill("two-capture@demo.twinleaf.test");
    await page.getByLabel("Password").fill("WRONGPASSWORD");
    const posted = page.waitForRequest((r) => r.method() === "POST" && Boolean(r.headers()["next-action"]));
    await page.getByRole("button", { name: "Sign in" }).click();
    const req = await posted;
    const headers = { ...req.headers() };
    delete headers["content-length"];
    const body = (req.postData() ?? "").split("two-capture@demo.twinleaf.test").join("two-burst@demo.twinleaf.test");
    await page.context().close();

    const answers = await across(30, async (base) => {
      const res = await fetch(`${base}/sign-in`, { method: "POST", headers: { ...headers, origin: base }, body, redirect: "manual" });
      return { status: res.status, text: await res.text() };
    });
    expect(answers.filter((a) => a.status >= 500)).toEqual([]);
    // lib/auth/throttle.ts THROTTLE: five failures per account in the window.
    expect(answers.filter((a) => a.text.includes("do not match an active account"))).toHaveLength(5);
    expect(answers.filter((a) => a.text.includes("Too many tries"))).toHaveLength(25);
    const [n] = await db.select({ n: sql<number>`count(*)` }).from(limitHits).where(eq(limitHits.key, "sign-in:account:two-burst@demo.twinleaf.test"));
    expect(n!.n).toBe(5);
  });

  test("cases opened at once through both are all kept, each is found at once through the other, and every mail goes out once", async () => {
    const cookie = await sessionCookie("service@demo.twinleaf.test");
    const pairs = await db.all<{ speaker: string }>(sql`
      SELECT (SELECT i.identity FROM links l JOIN items i ON i.id = l.child_id
              WHERE l.parent_id = p.id AND l.position = 'L' AND l.ended_at IS NULL AND i.kind = 'speaker') AS speaker
      FROM items p WHERE p.kind = 'pair' AND p.state = 'shipped'
        AND NOT EXISTS (SELECT 1 FROM service_cases c WHERE c.pair_id = p.id)
      ORDER BY p.identity LIMIT 10`);
    expect(pairs.length).toBe(10);
    const before = (await db.select({ n: sql<number>`count(*)` }).from(serviceCases))[0]!.n;

    // Invented owners; the domain is reserved for tests.
    const opened = await across(pairs.length, async (base, i) => {
      const res = await fetch(`${base}/api/v1/service/cases`, {
        method: "POST",
        headers: { cookie, origin: base, "content-type": "application/json" },
        body: JSON.stringify({
          serial: pairs[i]!.speaker,
          symptom: "Hiss from the tweeter at idle",
          returnedBy: "owner",
          owner: { name: `Wren Twoprocess ${i}`, email: `wren.twoprocess.${i}@twinleaf.test`, town: "Hawick", country: "GB", consent: true },
        }),
      });
      return { base, status: res.status, body: (await res.json()) as { code?: string; error?: string } };
    });
    expect(opened.filter((o) => o.status >= 500)).toEqual([]);
    // Every write either went in or was told "busy" in words (503); none is lost or doubled.
    for (const o of opened.filter((o) => o.status !== 201)) expect(o).toMatchObject({ status: 503, body: { error: expect.stringMatching(/busy/) } });
    const made = opened.filter((o) => o.status === 201);
    expect(made.length).toBeGreaterThanOrEqual(pairs.length - 1);
    expect((await db.select({ n: sql<number>`count(*)` }).from(serviceCases))[0]!.n).toBe(before + made.length);

    // Each case, written through one process, is there at once through the other: its JSON, its
    // page, and the new owner in the search box (its index is rebuilt when the owners change).
    for (const o of made) {
      const other = bases.find((b) => b !== o.base)!;
      const json = await fetch(`${other}/api/v1/service/cases/${o.body.code}`, { headers: { cookie } });
      expect(json.status).toBe(200);
      const page = await fetch(`${other}${paths.serviceCase(o.body.code!)}`, { headers: { cookie } });
      expect(page.status).toBe(200);
      expect(await page.text()).toContain(o.body.code!);
    }
    const i = opened.findIndex((o) => o.status === 201);
    const found = await fetch(`${bases.find((b) => b !== opened[i]!.base)}/api/v1/search?q=${encodeURIComponent(`Wren Twoprocess ${i}`)}`, { headers: { cookie } });
    expect(JSON.stringify(await found.json())).toContain(`Wren Twoprocess ${i}`);

    // More mail queued straight into the outbox while both senders run.
    const queued: number[] = [];
    for (let m = 0; m < 20; m++) {
      queued.push(await db.transaction((tx) => queueMail(tx, { to: `reader.${m}@twinleaf.test`, subject: `Two senders, message ${m}`, text: "Hello" })));
    }
    const casesMail = await db.select({ id: outbox.id }).from(outbox).where(sql`${outbox.to} LIKE 'wren.twoprocess.%'`);
    const ids = [...queued, ...casesMail.map((r) => r.id)];
    expect(casesMail.length).toBeGreaterThanOrEqual(made.length);
    await expect
      .poll(async () => (await db.select({ id: mailAttempts.outboxId }).from(mailAttempts).where(and(inArray(mailAttempts.outboxId, ids), eq(mailAttempts.ok, true)))).length, { timeout: 30_000 })
      .toBe(ids.length);
    // Give a second sender time to make a mistake, then count: one try and one message each.
    await new Promise((r) => setTimeout(r, 500));
    const tries = await db.select({ id: mailAttempts.outboxId }).from(mailAttempts).where(inArray(mailAttempts.outboxId, ids));
    expect(tries).toHaveLength(ids.length);
    expect(await db.select().from(mailClaims).where(inArray(mailClaims.outboxId, ids))).toEqual([]);
    const subjects = (await readMailbox(mailboxDir, { limit: 1000 })).filter((m) => /Two senders|wren\.twoprocess/.test(m.subject + m.to));
    expect(subjects).toHaveLength(ids.length);
    expect(new Set(subjects.map((m) => `${m.to} ${m.subject}`)).size).toBe(ids.length);
  });
});
