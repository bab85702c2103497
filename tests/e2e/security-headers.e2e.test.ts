import type { Browser, ConsoleMessage, Page } from "playwright-core";
import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
let pair: string;
beforeAll(async () => {
  const { client, db } = openDb(inject("databaseUrl"));
  const rows = await db.all<{ identity: string }>(sql`SELECT identity FROM items WHERE kind = 'pair' ORDER BY id LIMIT 1`);
  client.close();
  pair = rows[0]!.identity;
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

/** The directives of a policy, by name (CSP Level 3 § 2.2.1: a ;-separated list). */
function directives(policy: string | null): Map<string, string> {
  return new Map((policy ?? "").split(";").map((d) => d.trim()).filter(Boolean).map((d) => [d.split(/\s+/)[0]!, d.slice(d.indexOf(" ") + 1)]));
}

// Raw requests, as an outside probe sends them: no browser, no cookie.
async function raw(path: string, init?: RequestInit) {
  return fetch(url(path), { redirect: "manual", ...init });
}

/** The first script and style sheet the sign-in page loads, so the test asks for real assets. */
async function assetsOfSignIn(): Promise<string[]> {
  const html = await (await raw("/sign-in")).text();
  return [...html.matchAll(/(?:src|href)="(\/_next\/static\/[^"]+\.(?:js|css))"/g)].map((m) => m[1]!).slice(0, 2);
}

describe("security headers on every kind of answer", () => {
  const common = (res: Response) => {
    expect(res.headers.get("x-content-type-options")).toBe("nosniff");
    expect(res.headers.get("referrer-policy")).toBe("strict-origin-when-cross-origin");
    expect(res.headers.get("permissions-policy")).toContain("camera=()");
    // Served over plain http here: no HSTS (it is sent only over https).
    expect(res.headers.get("strict-transport-security")).toBeNull();
    expect(directives(res.headers.get("content-security-policy")).get("frame-ancestors")).toBe("'none'");
  };

  // A cookie that opens no session passes the proxy's redirect, so the page itself answers.
  const stranger = { cookie: "twinleaf_session=opens-nothing" };
  test.each<[string, string, number, Record<string, string>]>([
    ["the sign-in page", "/sign-in", 200, {}],
    ["the public certificate check, for a code it does not know", "/verify/NO-SUCH-CODE", 404, {}],
    ["a page that does not exist", "/no/such/page", 404, stranger],
    ["a page behind sign-in, refused", "/cabinet", 307, {}],
    ["a page behind sign-in, with a cookie that opens nothing", "/cabinet", 307, stranger],
  ])("%s", async (_, path, status, headers) => {
    const res = await raw(path, { headers });
    expect(res.status).toBe(status);
    common(res);
    if (status !== 307) {
      const csp = directives(res.headers.get("content-security-policy"));
      expect(csp.get("script-src")).toMatch(/^'self' 'nonce-[A-Za-z0-9+/=]{24}' 'strict-dynamic'$/);
      expect(csp.get("script-src")).not.toContain("unsafe");
    }
  });

  test("each page answer carries its own nonce, and Next puts it on its scripts", async () => {
    const a = await raw("/sign-in");
    const b = await raw("/sign-in");
    const nonceOf = (r: Response) => /'nonce-([^']+)'/.exec(r.headers.get("content-security-policy") ?? "")?.[1];
    expect(nonceOf(a)).toBeTruthy();
    expect(nonceOf(a)).not.toBe(nonceOf(b));
    const html = await a.text();
    const scripts = [...html.matchAll(/<script\b[^>]*>/g)].map((m) => m[0]);
    expect(scripts.length).toBeGreaterThan(0);
    for (const s of scripts) expect(s).toContain(`nonce="${nonceOf(a)}"`);
  });

  test.each([
    ["an API answer without a session", "/api/v1/me", 401],
    ["an API answer for a missing item", "/api/v1/items/NO-SUCH-ITEM", 401],
  ])("%s", async (_, path, status) => {
    const res = await raw(path);
    expect(res.status).toBe(status);
    common(res);
    expect(directives(res.headers.get("content-security-policy")).get("default-src")).toBe("'none'");
  });

  test("static assets and fonts", async () => {
    const assets = await assetsOfSignIn();
    expect(assets.length).toBeGreaterThan(0);
    for (const path of [...assets, "/_next/static/no-such-file.js"]) {
      const res = await raw(path);
      expect(res.headers.get("x-content-type-options"), path).toBe("nosniff");
      expect(res.headers.get("referrer-policy"), path).toBe("strict-origin-when-cross-origin");
      expect(directives(res.headers.get("content-security-policy")).get("default-src"), path).toBe("'none'");
    }
  });

  test("HSTS is sent when a request says https, but only if the proxy in front is trusted", async () => {
    // The test server runs without TWINLEAF_TRUSTED_PROXY, so a forged header earns nothing.
    const res = await raw("/sign-in", { headers: { "x-forwarded-proto": "https" } });
    expect(res.headers.get("strict-transport-security")).toBeNull();
  });
});

describe("in the browser", () => {
  test("the sign-in page refuses to be framed by another site", async () => {
    const page = await newPage(browser);
    // Another origin on the same machine (127.0.0.1 and localhost are different origins), its
    // page made up by the browser's own request interception.
    const base = new URL(url("/"));
    const hostile = new URL("/framing-test", base);
    hostile.hostname = base.hostname === "localhost" ? "127.0.0.1" : "localhost";
    // Beside it, a frame of the hostile origin's own, with a password field: frames do show here,
    // so a missing field in the sign-in frame is the browser's refusal, not a blank test page.
    const control = new URL("/framing-control", hostile);
    await page.route(control.href, (r) => r.fulfill({ contentType: "text/html", body: `<input type="password">` }));
    await page.route(hostile.href, (r) => r.fulfill({ contentType: "text/html", body: `<iframe src="${url("/sign-in")}"></iframe><iframe src="${control.href}"></iframe>` }));
    const asked: string[] = [];
    page.on("request", (r) => asked.push(r.url()));
    await page.goto(hostile.href, { waitUntil: "load" });
    const passwordFields = async (frameUrl: string) => {
      const frame = page.frames().find((f) => f.url() === frameUrl);
      return frame ? frame.locator("input[type=password]").count().catch(() => 0) : 0;
    };
    await expect.poll(() => passwordFields(control.href), { timeout: 10_000 }).toBe(1);
    // The frame did ask for the sign-in page, and the browser would not show it.
    expect(asked).toContain(url("/sign-in"));
    expect(await passwordFields(url("/sign-in"))).toBe(0);
    const signInFrame = page.frames().find((f) => f !== page.mainFrame() && f.url() !== control.href);
    expect(await signInFrame?.locator("input[type=password]").count().catch(() => 0)).toBe(0);
    await page.context().close();
  });

  test("signing in, searching and opening an item log no CSP violation, and the pages hydrate", async () => {
    const page: Page = await newPage(browser);
    const violations: string[] = [];
    const onConsole = (m: ConsoleMessage) => {
      if (/Content Security Policy|Refused to (?:execute|load|apply|connect|frame)/i.test(m.text())) violations.push(m.text());
    };
    page.on("console", onConsole);
    await page.addInitScript(() => {
      document.addEventListener("securitypolicyviolation", (e) => console.error(`Content Security Policy violation: ${e.violatedDirective} ${e.blockedURI}`));
    });
    // Signing in goes through the form's server action: it works only if the page hydrated.
    await signIn(page, demoEmail("service"));
    // Search: a scanned serial (text then Enter) opens its item's page.
    await visit(page, url("/"));
    const box = page.getByTestId("search-input");
    await box.fill(pair);
    await box.press("Enter");
    await page.getByTestId("item-page").waitFor();
    // Search by words, then a result opened with the keyboard.
    await visit(page, url("/"));
    await page.getByTestId("search-input").fill("Merow Lane");
    await page.getByTestId("search-option").first().waitFor();
    await page.getByTestId("search-input").press("ArrowDown");
    await page.getByTestId("search-input").press("Enter");
    await page.getByTestId("dealer-page").waitFor();
    await visit(page, url("/service"));
    expect(violations).toEqual([]);
    await page.context().close();
  });
});
