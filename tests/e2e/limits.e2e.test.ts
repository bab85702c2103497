import { eq, gte, sql } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { limitHits, outbox } from "@/db/schema";
import { demoEmail, DEMO_PASSWORD, launchBrowser, newPage, url, visit } from "./browser-helpers";

// The outside probe's requests, sent raw to the built server: a captured form post is replayed with
// other fields and headers, as an attacker's script would.
let browser: Browser;
const { client, db } = openDb(inject("databaseUrl"));
const started = new Date();

beforeAll(async () => {
  browser = await launchBrowser();
  // Earlier files' tries came from 127.0.0.1 too; the counts below start from none.
  await db.delete(limitHits);
});
afterAll(async () => {
  await browser?.close();
  // Every try here comes from 127.0.0.1: clear them so the files after this one can sign in.
  await db.delete(limitHits).where(gte(limitHits.at, started));
  client.close();
});

interface Captured {
  url: string;
  headers: Record<string, string>;
  body: string;
}

/** Fills a form on `path` once through the browser and keeps its server-action post to replay. */
async function capture(page: Page, path: string, fill: (page: Page) => Promise<void>, button: string): Promise<Captured> {
  await visit(page, url(path));
  await fill(page);
  const posted = page.waitForRequest((r) => r.method() === "POST" && Boolean(r.headers()["next-action"]));
  await page.getByRole("button", { name: button }).click();
  const req = await posted;
  const headers = { ...req.headers() };
  delete headers["content-length"];
  return { url: req.url(), headers, body: req.postData() ?? "" };
}

async function replay(c: Captured, swaps: [string, string][], extraHeaders: Record<string, string> = {}) {
  const body = swaps.reduce((b, [from, to]) => b.split(from).join(to), c.body);
  // A browser sends its page's Origin with every POST (the request record may leave it out).
  const res = await fetch(c.url, { method: "POST", headers: { origin: new URL(c.url).origin, ...c.headers, ...extraHeaders }, body, redirect: "manual" });
  const text = await res.text();
  return { text, session: (res.headers.get("set-cookie") ?? "").includes("twinleaf_session=") };
}

const hitsOf = async (key: string) => (await db.select({ n: sql<number>`count(*)` }).from(limitHits).where(eq(limitHits.key, key)))[0]!.n;

describe("the probe's attacks, against the built server", () => {
  let signInPost: Captured;
  beforeAll(async () => {
    const page = await newPage(browser);
    signInPost = await capture(
      page,
      "/sign-in",
      async (p) => {
        await p.getByLabel("E-mail").fill("probe-capture@demo.twinleaf.test");
        await p.getByLabel("Password").fill("WRONGPASSWORD");
      },
      "Sign in",
    );
    await page.getByTestId("sign-in-error").waitFor();
    await page.context().close();
  });

  test("a different X-Forwarded-For on every guess does not escape the address limit", async () => {
    const results = [];
    for (let i = 0; i < 25; i++) {
      results.push(await replay(signInPost, [["probe-capture@demo.twinleaf.test", `probe-rotate-${i}@demo.twinleaf.test`]], { "x-forwarded-for": `203.0.113.${i + 1}`, "x-twinleaf-peer": `198.51.100.${i + 1}` }));
    }
    // The capture counted once already: 19 more are checked, then the connection is throttled.
    expect(results.filter((r) => r.text.includes("Too many tries")).length).toBe(6);
    expect(await hitsOf("sign-in:address:127.0.0.1")).toBe(20);
    await db.delete(limitHits).where(gte(limitHits.at, started));
  });

  test("30 wrong passwords at once to one account: 5 are checked", async () => {
    const email = "probe-burst@demo.twinleaf.test";
    const results = await Promise.all(Array.from({ length: 30 }, () => replay(signInPost, [["probe-capture@demo.twinleaf.test", email]])));
    expect(results.filter((r) => r.text.includes("do not match an active account")).length).toBe(5);
    expect(results.filter((r) => r.text.includes("Too many tries")).length).toBe(25);
    await db.delete(limitHits).where(gte(limitHits.at, started));
  });

  test("the right password among 29 wrong ones, once the limit is hit, gives no session", async () => {
    const email = demoEmail("service");
    const swap = (password: string): [string, string][] => [["probe-capture@demo.twinleaf.test", email], ["WRONGPASSWORD", password]];
    for (let i = 0; i < 5; i++) await replay(signInPost, swap("not-it"));
    const tries = Array.from({ length: 30 }, (_, i) => replay(signInPost, swap(i === 12 ? DEMO_PASSWORD : "not-it")));
    const results = await Promise.all(tries);
    expect(results.some((r) => r.session)).toBe(false);
    expect(results.every((r) => r.text.includes("Too many tries"))).toBe(true);
    await db.delete(limitHits).where(gte(limitHits.at, started));
  });

  test("42 reset requests for one address in a minute send at most 3 mails, each answered alike", async () => {
    const page = await newPage(browser);
    const email = demoEmail("quality");
    const post = await capture(page, "/reset", async (p) => p.getByLabel("E-mail").fill(email), "Send me a link");
    await page.getByText("If that address belongs to an account").waitFor();
    await page.context().close();
    const before = (await db.select().from(outbox).where(eq(outbox.to, email))).length;
    const answers = [];
    for (let i = 0; i < 41; i++) answers.push(await replay(post, [], { "x-forwarded-for": `203.0.113.${i}` }));
    expect(answers.every((a) => a.text.includes("If that address belongs to an account"))).toBe(true);
    const after = (await db.select().from(outbox).where(eq(outbox.to, email))).length;
    // The captured request was the first of the 42; the outbox had `before` after it.
    expect(after - before).toBe(2);
    await db.delete(limitHits).where(gte(limitHits.at, started));
  });

  test("the certificate check over its limit answers 429 with Retry-After, whatever is forwarded", async () => {
    const statuses = [];
    let last: Response | undefined;
    for (let i = 0; i < 31; i++) {
      last = await fetch(url(`/verify/${"b".repeat(26)}`), { headers: { "x-forwarded-for": `203.0.113.${i}` } });
      statuses.push(last.status);
      await last.text();
    }
    expect(statuses.slice(0, 30).every((s) => s === 404)).toBe(true);
    expect(statuses[30]).toBe(429);
    expect(Number(last!.headers.get("retry-after"))).toBeGreaterThan(500);
    await db.delete(limitHits).where(gte(limitHits.at, started));
  });
});
