/**
 * Every page and every route handler of the built server, asked for as every role, signed out,
 * with a session cookie that names no session, and with a lab test bench's machine token; each
 * answer is compared with the hand-written table in tests/fixtures/access/table.ts (never with the
 * permission map). Pages: let in → 200 and the page; refused → 403 and the forbidden page;
 * signed out → sent to sign-in. Routes: let in → neither 401 nor 403; refused → exactly 401 or
 * 403 in JSON. Nothing any of these requests does may write to the register.
 */
import { sql } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { AREAS } from "@/lib/areas";
import { createMachineToken, revokeMachineToken } from "@/lib/auth/machine-tokens";
import { ROLES, type Role } from "@/lib/auth/roles";
import { affectedSerials, closeContainment, moveAffected, raiseContainment } from "@/lib/containments";
import { requestPasswordReset } from "@/lib/users/queries";
import { fillPath, paramsOf } from "../fixtures/access/discover";
import { snapshot } from "../fixtures/access/snapshot";
import { expectedToday, lets, PAGES, ROUTES, type PageAccess, type RouteAccess, type Sample } from "../fixtures/access/table";
import { demoEmail, launchBrowser, newPage, signIn, url, visit, waitForMail } from "./browser-helpers";

const { client, db } = openDb(inject("databaseUrl"));

let browser: Browser;
const pages = new Map<Role, Page>();
const sessionOf = new Map<Role, string>();
const bearer = { valid: "", revoked: "" };
/** Each sample's parameter value, and the query a page opened with it needs. */
const samples = new Map<Sample, { value: string; search?: string }>();
/** The register before the walks: they must leave it as it was. */
let before: Record<string, unknown[]>;

// Written by the server whatever the request: sessions extend themselves, the certificate check
// counts its readers for its rate limit, and the stand-in mail sender keeps delivering what other
// tests queued (claiming each message while it sends, then forgetting the links' tokens).
const NOT_COMPARED = ["sessions", "limit_hits", "outbox", "mail_attempts", "mail_secrets", "mail_claims"];

async function one<T>(query: ReturnType<typeof sql>, what: string): Promise<T> {
  const [row] = await db.all<T>(query);
  if (!row) throw new Error(`the demo register has no ${what}`);
  return row;
}

beforeAll(async () => {
  browser = await launchBrowser();
  for (const role of ROLES) {
    const page = await newPage(browser);
    await signIn(page, demoEmail(role));
    const cookie = (await page.context().cookies()).find((c) => c.name === "twinleaf_session");
    if (!cookie) throw new Error(`no session cookie after signing in as ${role}`);
    sessionOf.set(role, cookie.value);
    pages.set(role, page);
  }

  const admin = await one<{ id: string }>(sql`SELECT id FROM users WHERE email = ${demoEmail("admin")}`, "admin");
  bearer.valid = `Bearer ${(await createMachineToken(db, { name: "Roles walk bench", scope: "lab", actorId: admin.id })).token}`;
  const old = await createMachineToken(db, { name: "Roles walk bench, retired", scope: "lab", actorId: admin.id });
  await revokeMachineToken(db, { id: old.row.id, actorId: admin.id });
  bearer.revoked = `Bearer ${old.token}`;

  // A caught message for the admin's mail page: a reset link, as a forgotten password sends.
  await requestPasswordReset(db, { email: demoEmail("quality"), baseUrl: inject("baseUrl"), address: "127.0.0.1" });
  samples.set("mail", { value: (await waitForMail(demoEmail("quality"), /password/i)).id });

  const pair = await one<{ identity: string; code: string }>(
    sql`SELECT p.identity, c.code FROM certificates c JOIN items p ON p.id = c.pair_id ORDER BY p.identity LIMIT 1`,
    "pair with a certificate",
  );
  samples.set("pair", { value: pair.identity });
  samples.set("certificate", { value: pair.code });
  const flitch = await one<{ flitch: string; pair: string }>(
    sql`SELECT f.identity AS flitch, p.identity AS pair FROM leaf_allocations a
        JOIN veneer_leaves l ON l.item_id = a.leaf_id JOIN items f ON f.id = l.flitch_id JOIN items p ON p.id = a.pair_id
        WHERE a.role = 'face' ORDER BY f.identity, p.identity LIMIT 1`,
    "flitch with a confirmed pair",
  );
  samples.set("flitch", { value: flitch.flitch, search: `pairs=${encodeURIComponent(flitch.pair)}` });
  samples.set("batch", { value: (await one<{ code: string }>(sql`SELECT code FROM unit_batches ORDER BY code LIMIT 1`, "batch")).code });
  samples.set("model", { value: (await one<{ code: string }>(sql`SELECT code FROM models ORDER BY code LIMIT 1`, "model")).code });
  samples.set("user", { value: (await one<{ id: string }>(sql`SELECT id FROM users WHERE email = ${demoEmail("veneer")}`, "veneer user")).id });
  samples.set("dealer", { value: (await one<{ code: string }>(sql`SELECT code FROM dealers ORDER BY code LIMIT 1`, "dealer")).code });
  samples.set("owner", { value: (await one<{ id: string }>(sql`SELECT id FROM owners ORDER BY id LIMIT 1`, "owner")).id });
  samples.set("token", { value: "roles-walk-no-such-token" });
  samples.set("case", { value: (await one<{ code: string }>(sql`SELECT code FROM service_cases ORDER BY code LIMIT 1`, "service case")).code });
  // A containment on the shipped sample pair, worked through and closed at once, so it holds nothing
  // while the other walks run.
  const quality = { id: (await one<{ id: string }>(sql`SELECT id FROM users WHERE email = ${demoEmail("quality")}`, "quality user")).id };
  const raised = await raiseContainment(db, { target: pair.identity, reason: "Roles walk: a containment to open the page with.", severity: "minor" }, quality);
  await moveAffected(db, { code: raised.code, serials: (await affectedSerials(db, raised.id)).map((a) => a.serial), to: "cleared", note: "" }, quality);
  await closeContainment(db, { code: raised.code, reason: "Roles walk: nothing was wrong." }, quality);
  samples.set("containment", { value: raised.code });

  before = await snapshot(db, NOT_COMPARED);
});

afterAll(async () => {
  await browser?.close();
  client.close();
});

type Caller = Role | "signed out" | "unknown session" | "lab token" | "revoked lab token";

function headersOf(caller: Caller): Record<string, string> {
  if (caller === "signed out") return {};
  if (caller === "unknown session") return { cookie: "twinleaf_session=roles-walk-no-such-session" };
  if (caller === "lab token") return { authorization: bearer.valid };
  if (caller === "revoked lab token") return { authorization: bearer.revoked };
  return { cookie: `twinleaf_session=${sessionOf.get(caller)}` };
}

const isRole = (caller: Caller): caller is Role => (ROLES as readonly string[]).includes(caller);

// ---- navigation --------------------------------------------------------------------------------

describe.each(ROLES)("the %s user", (role) => {
  test("sees in the navigation exactly the areas whose home the table lets the role open", async () => {
    const page = pages.get(role)!;
    await visit(page, url("/"));
    const links = await page.getByTestId("area-nav").getByRole("link").allTextContents();
    expect(links).toEqual(["Today", ...AREAS.filter((a) => lets(PAGES[a.href]!, role)).map((a) => a.label)]);
  });
});

// ---- pages -------------------------------------------------------------------------------------

const PAGE_CALLERS: Caller[] = [...ROLES, "signed out", "unknown session", "lab token"];

type PageAnswer = "the page" | "403" | "sign-in" | `sent to ${string}`;

function pageAnswer(row: PageAccess, caller: Caller): PageAnswer {
  if (expectedToday(row) === "public") return isRole(caller) && row.signedInGoesTo ? `sent to ${row.signedInGoesTo}` : "the page";
  // A bearer token is no session: pages know only the cookie.
  if (!isRole(caller)) return "sign-in";
  return lets(row, caller) ? "the page" : "403";
}

function pageUrl(path: string, row: PageAccess): string {
  if (!row.sample) return url(path);
  const sample = samples.get(row.sample);
  if (!sample) throw new Error(`${path}: no "${row.sample}" looked up in this file's beforeAll`);
  const [param] = paramsOf(path);
  return url(`${fillPath(path, { [param!.name]: sample.value })}${sample.search ? `?${sample.search}` : ""}`);
}

describe.each(Object.entries(PAGES))("page %s", (path, row) => {
  test.each(PAGE_CALLERS.map((caller) => [caller, pageAnswer(row, caller)] as const))("as %s: %s", async (caller, answer) => {
    const res = await fetch(pageUrl(path, row), { headers: headersOf(caller), redirect: "manual" });
    const body = await res.text();
    const where = res.headers.get("location") ?? "";
    // forbidden() and notFound() reach the browser as this digest in the streamed payload (the
    // fallback pages themselves are always in it, so their markup says nothing); a page streamed
    // with 200 that is refused or missing further down still carries the digest.
    const fallback = /NEXT_HTTP_ERROR_FALLBACK;(\d{3})/.exec(body)?.[1];
    if (answer === "the page") {
      expect(res.status, `${path} ${where}`).toBe(200);
      expect(fallback, `${path}: an error page inside the answer`).toBeUndefined();
    } else if (answer === "403") {
      expect(res.status, `${path} ${where}`).toBe(403);
      expect(fallback).toBe("403");
    } else {
      // Next answers redirect() with 307 (303 after an action); the proxy with 307.
      expect([302, 303, 307, 308], `${path}: ${res.status}`).toContain(res.status);
      const to = new URL(where, url("/")).pathname;
      expect(to).toBe(answer === "sign-in" ? "/sign-in" : answer.replace(/^sent to /, ""));
    }
  });
});

// ---- routes ------------------------------------------------------------------------------------

const ROUTE_CALLERS: Caller[] = [...ROLES, "signed out", "unknown session", "lab token", "revoked lab token"];

function routeAnswer(row: RouteAccess, caller: Caller): "passes" | 401 | 403 {
  if (expectedToday(row) === "public") return "passes";
  if (isRole(caller)) return lets(row, caller) ? "passes" : 403;
  if (caller === "signed out" || caller === "unknown session") return 401;
  // Only routes that let lab benches in look at a token; every other route refuses any token.
  if (!row.labToken) return 403;
  return caller === "lab token" ? "passes" : 401;
}

describe.each(Object.entries(ROUTES))("route %s", (id, row) => {
  const [method, path] = id.split(" ") as [string, string];
  // A parameter that names nothing: a caller let in gets 400 or 404 and nothing is made or printed.
  const target = url(fillPath(path, Object.fromEntries(paramsOf(path).map((p) => [p.name, "roles-walk-probe"]))));

  test.each(ROUTE_CALLERS.map((caller) => [caller, routeAnswer(row, caller)] as const))("as %s: %s", async (caller, answer) => {
    const headers: Record<string, string> = { ...headersOf(caller), origin: url("").replace(/\/$/, "") };
    const init: RequestInit = { method, headers, redirect: "manual" };
    if (method !== "GET" && method !== "HEAD") {
      headers["content-type"] = "application/json";
      init.body = "{}";
    }
    const res = await fetch(target, init);
    const text = await res.text();
    if (answer === "passes") {
      expect([401, 403], text).not.toContain(res.status);
      expect(res.status, text).toBeLessThan(500);
      return;
    }
    expect(res.status, text).toBe(answer);
    expect(JSON.parse(text)).toMatchObject({ error: expect.any(String) });
  });
});

describe("after every page and route above", () => {
  test("the register is exactly as it was", async () => {
    expect(await snapshot(db, NOT_COMPARED)).toEqual(before);
  });
});
