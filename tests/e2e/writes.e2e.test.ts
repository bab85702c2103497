/**
 * Nothing a GET does writes, and a write comes only from this origin, tried from outside on the
 * built server: every page reached by links (and the new pairs' page, reached only after
 * confirming) is opened in the browser, scripts and all, between two snapshots of the whole
 * database; a server action sent with a foreign Origin is refused by Next's own check
 * and writes nothing. Route handlers are walked the same way in tests/integration/get-writes.test.ts.
 */
import { createHash } from "node:crypto";
import { sql } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { AREAS } from "@/lib/areas";
import { ROLES } from "@/lib/auth/roles";
import { setRoles } from "@/lib/users/queries";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
const { client, db } = openDb(inject("databaseUrl"));

/** Every table's row count and a digest of its rows (in any order; some tables have no rowid): any insert, update or delete shows. */
async function snapshot(): Promise<Record<string, string>> {
  const tables = await db.all<{ name: string }>(sql`SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' AND name NOT LIKE '__drizzle%' ORDER BY name`);
  const out: Record<string, string> = {};
  for (const { name } of tables) {
    const rows = await db.all<Record<string, unknown>>(sql.raw(`SELECT * FROM "${name}"`));
    out[name] = `${rows.length} rows, ${createHash("sha256").update(rows.map((r) => JSON.stringify(r, (_k, v) => (typeof v === "bigint" ? String(v) : v))).sort().join("\n")).digest("hex").slice(0, 16)}`;
  }
  return out;
}

/** A page address with its serials and ids folded, so each kind of page is opened once per role. */
const shape = (path: string) => path.replace(/\?.*$/, "").replace(/\/[^/]*\d[^/]*/g, "/#");

async function crawl(page: Page, start: string[], limit: number): Promise<string[]> {
  const origin = new URL(url("/")).origin;
  const queue = [...start];
  const seen = new Set<string>();
  const opened: string[] = [];
  while (queue.length && opened.length < limit) {
    const path = queue.shift()!;
    if (seen.has(shape(path))) continue;
    seen.add(shape(path));
    const res = await visit(page, url(path));
    opened.push(`${path} ${res?.status()}`);
    const links = await page.$$eval("a[href]", (as) => as.map((a) => (a as HTMLAnchorElement).href));
    for (const href of links) {
      const u = new URL(href);
      // Pages only: PDFs and the API are walked as route handlers.
      if (u.origin !== origin || u.pathname.startsWith("/api/") || u.pathname.startsWith("/verify")) continue;
      if (!seen.has(shape(u.pathname + u.search))) queue.push(u.pathname + u.search);
    }
  }
  return opened;
}

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  client.close();
});

describe("opening pages writes nothing", () => {
  // One person holding every role opens every kind of page once (the pages a role may not open are
  // walked as raw requests, role by role, in tests/e2e/roles.e2e.test.ts). The demo's quality user
  // lends themself for it and gets their own role back afterwards.
  const BORROWED = "quality" as const;
  let userId = "";
  let adminActor = { id: "", name: "" };

  beforeAll(async () => {
    const [u] = await db.all<{ id: string }>(sql`SELECT id FROM users WHERE email = ${demoEmail(BORROWED)}`);
    const [a] = await db.all<{ id: string; name: string }>(sql`SELECT id, name FROM users WHERE email = ${demoEmail("admin")}`);
    userId = u!.id;
    adminActor = { id: a!.id, name: a!.name };
    await setRoles(db, { userId, roles: [...ROLES], actor: adminActor, reason: "e2e: one person opens every page" });
  });
  afterAll(async () => {
    if (userId) await setRoles(db, { userId, roles: [BORROWED], actor: adminActor, reason: "e2e: back to their own role" });
  });

  test("every page reached by links, as a person holding every role", async () => {
    const page = await newPage(browser);
    await signIn(page, demoEmail(BORROWED));
    const before = await snapshot();
    const opened = await crawl(page, ["/", "/register", ...AREAS.map((a) => a.href)], 80);
    expect(opened.length).toBeGreaterThan(20);
    expect(await snapshot(), `after opening:\n${opened.join("\n")}`).toEqual(before);
    await page.context().close();
  }, 300_000);

  test("the new pairs' page prints its label sheet only when asked", async () => {
    const [row] = await db.all<{ flitch: string; pair: string }>(sql`
      SELECT f.identity AS flitch, p.identity AS pair FROM leaf_allocations a
      JOIN veneer_leaves l ON l.item_id = a.leaf_id JOIN items f ON f.id = l.flitch_id JOIN items p ON p.id = a.pair_id
      WHERE a.role = 'face' AND a.cabinet_id IS NOT NULL LIMIT 1`);
    expect(row, "the demo holds a flitch with confirmed pairs").toBeTruthy();
    const page = await newPage(browser);
    await signIn(page, demoEmail("veneer"));
    const before = await snapshot();
    await visit(page, url(`/veneer/flitches/${encodeURIComponent(row!.flitch)}/confirmed?pairs=${encodeURIComponent(row!.pair)}`));
    await page.getByTestId("label-sheet-print").waitFor();
    await page.reload();
    await page.getByTestId("label-sheet-print").waitFor();
    expect(await snapshot()).toEqual(before);
    // Pressing the button prints, and the print is recorded.
    await page.getByTestId("label-sheet-print").click();
    await page.getByTestId("label-sheet").waitFor({ timeout: 20_000 });
    expect(await snapshot()).not.toEqual(before);
    await page.context().close();
  }, 120_000);
});

describe("a server action from another origin", () => {
  test("is refused with 403 and writes nothing; the same request from this origin is let in", async () => {
    const page = await newPage(browser);
    await signIn(page, demoEmail("admin"));
    // The invitation form sent once by the browser, as it is, and captured.
    await visit(page, url("/admin/users"));
    await page.getByRole("button", { name: "Invite someone" }).click();
    const form = page.getByTestId("invite-form");
    await form.getByLabel("Name").fill("Origin Probe");
    await form.getByLabel("E-mail").fill("probe.form@workshop.test");
    await form.getByLabel("Veneer room").check();
    const sent = page.waitForRequest((r) => r.method() === "POST" && new URL(r.url()).pathname === "/admin/users");
    await form.getByRole("button", { name: "Send invitation" }).click();
    const req = await sent;
    await page.getByTestId("toast").filter({ hasText: "probe.form@workshop.test" }).waitFor();
    const headers = Object.fromEntries(Object.entries(await req.allHeaders()).filter(([k]) => !["content-length", "origin", "cookie", "host", "sec-fetch-site"].includes(k)));
    expect(headers["next-action"], "the form is a server action").toBeTruthy();
    const body = req.postDataBuffer()!.toString("latin1");
    // The same action replayed with another address: from another site, then from this one.
    const replay = async (email: string, origin: string, site: string) => {
      const res = await page.request.fetch(req.url(), {
        method: "POST",
        headers: { ...headers, origin, "sec-fetch-site": site },
        data: Buffer.from(body.replace("probe.form@workshop.test", email), "latin1"),
        maxRedirects: 0,
      });
      const [found] = await db.all<{ n: number }>(sql`SELECT count(*) AS n FROM users WHERE email = ${email}`);
      return { status: res.status(), written: found!.n };
    };
    const before = await snapshot();
    const foreign = await replay("probe.frgn@workshop.test", "https://elsewhere.example", "cross-site");
    expect(foreign.written).toBe(0);
    // Refused by the proxy with words (Next's own check would answer 500), never a 500.
    expect(foreign.status).toBe(403);
    expect(await snapshot()).toEqual(before);
    // The control: the same replay from this origin is let in, so the refusal above was the origin's.
    const own = await replay("probe.same@workshop.test", new URL(url("/")).origin, "same-origin");
    expect(own.written).toBe(1);
    await page.context().close();
  }, 120_000);
});
