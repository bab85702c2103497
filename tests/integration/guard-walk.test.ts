/**
 * Walks every server action and route handler under app/ as every role, signed out, with a
 * session id that does not exist, and with a lab test bench's machine token (valid and revoked),
 * and compares each answer with the hand-written table in tests/fixtures/access/table.ts: let in → never
 * 401 or 403; refused → exactly 401 or 403, and the database unchanged. The expected answers come
 * from that table only, never from the permission an entry declares or from the permission map,
 * so a wrong permission on an action or a wrong line in the map fails here.
 * Pages are walked on the built server (tests/e2e/roles.e2e.test.ts); here they are only counted.
 */
import { join } from "node:path";
import { sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { seedDemo } from "@/db/seed/seed";
import { createMachineToken, revokeMachineToken } from "@/lib/auth/machine-tokens";
import { ROLES, type Role } from "@/lib/auth/roles";
import { startSession } from "@/lib/auth/sessions";
import type { FormState } from "@/lib/forms";
import { actionFiles, inlineServerFiles, pageFiles, paramsOf, ROOT, routeFiles, urlPathOf } from "../fixtures/access/discover";
import { ACTIONS, expectedToday, lets, PAGES, ROUTES, SIGNED_IN, type Access, type RouteAccess } from "../fixtures/access/table";
import { snapshot } from "../fixtures/access/snapshot";
import { nextHeaders, RedirectSignal, request } from "../setup/next-request";

// Signed in by setting request.sessionId: tests/integration/setup.ts mocks next/* with tests/setup/next-request.ts.

const HTTP_METHODS = new Set(["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"]);

// ---- discovery -------------------------------------------------------------------------------

type Guarded = ((...args: never[]) => Promise<unknown>) & { permission?: unknown; machine?: unknown };

interface Entry {
  /** "file#export" for an action, "METHOD /path" for a route: the table's key. */
  id: string;
  kind: "action" | "route";
  fn: Guarded;
  method?: string;
  /** A URL and params with a probe value for each parameter: the guard answers before any lookup. */
  url?: string;
  params?: Record<string, string | string[]>;
}

const entries: Entry[] = [];
/** Exports that can be neither walked nor called: a non-function from a "use server" file, an unknown route export. */
const strayExports: string[] = [];

for (const file of actionFiles) {
  const mod = (await import(/* @vite-ignore */ join(ROOT, file))) as Record<string, unknown>;
  for (const [name, value] of Object.entries(mod)) {
    if (typeof value !== "function") strayExports.push(`${file}#${name}`);
    else entries.push({ id: `${file}#${name}`, kind: "action", fn: value as Guarded });
  }
}
for (const file of routeFiles) {
  const mod = (await import(/* @vite-ignore */ join(ROOT, file))) as Record<string, unknown>;
  const path = urlPathOf(file);
  const params = Object.fromEntries(paramsOf(path).map((p) => [p.name, p.catchAll ? ["walk-probe"] : "walk-probe"]));
  const url = `http://localhost:3000${path.replace(/\[[^/]+\]/g, "walk-probe")}`;
  for (const [name, value] of Object.entries(mod)) {
    if (typeof value !== "function") continue; // route segment config such as `dynamic`
    if (!HTTP_METHODS.has(name)) {
      strayExports.push(`${file}#${name}`);
      continue;
    }
    entries.push({ id: `${name} ${path}`, kind: "route", fn: value as Guarded, method: name, url, params });
  }
}

const rowOf = (e: Entry): Access | RouteAccess | undefined => (e.kind === "action" ? ACTIONS[e.id] : ROUTES[e.id]);
/** Entries the table lists; the ones it does not fail the discovery tests below instead. */
const listed = entries.filter((e) => rowOf(e) !== undefined);

// ---- callers and what each should get -------------------------------------------------------

type Caller = Role | "signed out" | "unknown session" | "lab token" | "revoked lab token";
const CALLERS: Caller[] = [...ROLES, "signed out", "unknown session", "lab token", "revoked lab token"];

/** The answer a caller should get today: past the guard, or refused with this status. */
function expected(e: Entry, caller: Caller): "passes" | 401 | 403 {
  const row = rowOf(e)!;
  if (expectedToday(row) === "public") return "passes";
  if ((ROLES as readonly string[]).includes(caller)) return lets(row, caller as Role) ? "passes" : 403;
  if (caller === "signed out" || caller === "unknown session") return 401;
  // Actions know sessions only: a bearer token is no session. Routes refuse every token with 403
  // unless they let lab benches in; then an unknown or revoked token is 401.
  if (e.kind === "action") return 401;
  if (!(row as RouteAccess).labToken) return 403;
  return caller === "lab token" ? "passes" : 401;
}

// ---- calling ---------------------------------------------------------------------------------

interface Outcome {
  status: number;
  /** The form state or the JSON body, for messages. */
  body: unknown;
  redirectedTo?: string;
}

async function callAction(e: Entry): Promise<Outcome> {
  try {
    const state = await (e.fn as unknown as (prev: FormState | undefined, fd: FormData) => Promise<FormState>)(undefined, new FormData());
    return { status: state.status ?? (state.ok ? 200 : 0), body: state };
  } catch (err) {
    // redirect() after a successful body: the guard was passed.
    if (err instanceof RedirectSignal) return { status: 303, body: null, redirectedTo: err.to };
    throw err;
  }
}

/** What a browser sends with a request made by one of the app's own pages. */
const SAME_ORIGIN = { origin: "http://localhost:3000", "sec-fetch-site": "same-origin" };

async function call(e: Entry, authorization?: string, origin: Record<string, string> = SAME_ORIGIN): Promise<Outcome> {
  if (e.kind === "action") {
    if (!authorization) return callAction(e);
    // An action reads the request's headers through next/headers: give it the bearer token there.
    const plain = nextHeaders.headers;
    nextHeaders.headers = async () => new Headers({ host: "localhost:3000", authorization });
    try {
      return await callAction(e);
    } finally {
      nextHeaders.headers = plain;
    }
  }
  const headers: Record<string, string> = { ...origin, ...(authorization ? { authorization } : {}) };
  const res = await (e.fn as unknown as (req: Request, ctx: { params: Promise<Record<string, string | string[]>> }) => Promise<Response>)(
    new Request(e.url!, { method: e.method, headers }),
    { params: Promise.resolve(e.params ?? {}) },
  );
  const text = await res.text();
  let body: unknown = text;
  try {
    body = JSON.parse(text);
  } catch {
    // not JSON: kept as text for the message
  }
  return { status: res.status, body };
}

// ---- the walk --------------------------------------------------------------------------------

const userIdByRole = new Map<Role, string>();
const bearer = { valid: "", revoked: "" };

beforeAll(async () => {
  const { users: demo } = await seedDemo(getDb(), { history: false });
  const rows = await getDb().all<{ id: string; email: string }>(sql`SELECT id, email FROM users`);
  for (const role of ROLES) {
    // seedDemo makes one demo user per role holding exactly that role.
    const email = `${role}@demo.twinleaf.test`;
    expect(demo.find((u) => u.email === email)?.roles).toEqual([role]);
    const id = rows.find((r) => r.email === email)?.id;
    if (!id) throw new Error(`no demo user for ${role}`);
    userIdByRole.set(role, id);
  }
  const actorId = userIdByRole.get("admin")!;
  bearer.valid = `Bearer ${(await createMachineToken(getDb(), { name: "Walk bench", scope: "lab", actorId })).token}`;
  const old = await createMachineToken(getDb(), { name: "Walk bench, retired", scope: "lab", actorId });
  await revokeMachineToken(getDb(), { id: old.row.id, actorId });
  bearer.revoked = `Bearer ${old.token}`;
});

/** Makes the request the caller would send; a role's demo user gets a session of its own (sign-out ends the one it is given). */
async function become(caller: Caller): Promise<string | undefined> {
  request.cookieSets = [];
  request.sessionId = null;
  if (caller === "unknown session") request.sessionId = "walk-no-such-session";
  else if (caller === "lab token") return bearer.valid;
  else if (caller === "revoked lab token") return bearer.revoked;
  else if (caller !== "signed out") request.sessionId = (await startSession(userIdByRole.get(caller)!, getDb())).session.id;
  return undefined;
}

describe("the table and app/ list the same things", () => {
  test("the table's roles are the roles of the code", () => {
    expect([...SIGNED_IN].sort()).toEqual([...ROLES].sort());
  });

  test("every server action is in the table, and every action in the table exists", () => {
    const found = entries.filter((e) => e.kind === "action").map((e) => e.id);
    expect(found.filter((id) => !(id in ACTIONS)), "actions to add to ACTIONS in tests/fixtures/access/table.ts").toEqual([]);
    expect(Object.keys(ACTIONS).filter((id) => !found.includes(id)), "actions in the table that app/ no longer has").toEqual([]);
  });

  test("every route handler is in the table, and every route in the table exists", () => {
    const found = entries.filter((e) => e.kind === "route").map((e) => e.id);
    expect(found.filter((id) => !(id in ROUTES)), "routes to add to ROUTES in tests/fixtures/access/table.ts").toEqual([]);
    expect(Object.keys(ROUTES).filter((id) => !found.includes(id)), "routes in the table that app/ no longer has").toEqual([]);
  });

  test("every page is in the table, and every page in the table exists", () => {
    const found = pageFiles.map(urlPathOf);
    expect(found.filter((p) => !(p in PAGES)), "pages to add to PAGES in tests/fixtures/access/table.ts").toEqual([]);
    expect(Object.keys(PAGES).filter((p) => !found.includes(p)), "pages in the table that app/ no longer has").toEqual([]);
    for (const [path, row] of Object.entries(PAGES)) expect(Boolean(row.sample), `${path}: a page with a parameter names its sample`).toBe(paramsOf(path).length > 0);
  });

  test("a difference from PRODUCT.md names roles other than the table's", () => {
    for (const [id, row] of [...Object.entries(ACTIONS), ...Object.entries(ROUTES), ...Object.entries(PAGES)]) {
      if (row.differs) expect([...row.differs.may].sort(), id).not.toEqual(row.may === "public" ? "public" : [...row.may].sort());
    }
  });

  test("every export of a \"use server\" file is an action, and a route file exports only HTTP methods", () => {
    expect(strayExports).toEqual([]);
  });

  test("no \"use server\" directive hides inside another file, where the walk would not see it", () => {
    expect(inlineServerFiles).toEqual([]);
  });

  test("a route the table marks signature-checked is made with signedRoute, and only those are", () => {
    for (const e of listed.filter((x) => x.kind === "route")) {
      expect(Object.hasOwn(e.fn, "signedBy"), e.id).toBe(Boolean((rowOf(e) as RouteAccess).signature));
    }
  });

  test.each(entries.map((e) => [e.id, e] as const))("%s is made with guardedAction, publicAction or guardedRoute", (_id, e) => {
    // The wrappers mark what they make; a bare function would have no guard at all.
    expect(Object.hasOwn(e.fn, "permission")).toBe(true);
    if (e.kind === "route") expect(Object.hasOwn(e.fn, "machine")).toBe(true);
  });
});

const cases = listed.flatMap((e) => CALLERS.map((caller) => [e.id, caller, expected(e, caller), e] as const));

describe.each(listed.map((e) => [e.id] as const))("%s", (id) => {
  const mine = cases.filter((c) => c[0] === id).map(([, caller, answer, e]) => [caller, answer === "passes" ? "passes the guard" : `refused with ${answer}, nothing written`, answer, e] as const);

  test.each(mine)("as %s: %s", async (caller, _words, answer, entry) => {
    const authorization = await become(caller);
    if (answer === "passes") {
      const out = await call(entry, authorization);
      // Past the guard: an empty form may well be answered 400, but never 401 or 403.
      expect([401, 403], JSON.stringify(out.body)).not.toContain(out.status);
      return;
    }
    const before = await snapshot(getDb());
    const out = await call(entry, authorization);
    expect(out.status, JSON.stringify(out.body)).toBe(answer);
    if (entry.kind === "action") expect(out.body).toMatchObject({ ok: false, status: answer });
    else expect(out.body).toMatchObject({ error: expect.any(String) });
    if (caller === "unknown session") expect(request.cookieSets).toContainEqual({ name: "twinleaf_session", value: "" });
    expect(await snapshot(getDb())).toEqual(before);
  });
});

// Cross-site request forgery: every route that changes state takes requests from this origin only
// (lib/auth/guard.ts, refuseCrossOrigin), whoever is signed in. OWASP ASVS 4.0.3 V4.2.2.
const routes = listed.filter((e) => e.kind === "route");
// A signature-checked route (the payment webhook) is called by another origin's server: its own walk is below.
const signedRoutes = routes.filter((e) => (rowOf(e) as RouteAccess).signature);
const writingRoutes = routes.filter((e) => !["GET", "HEAD", "OPTIONS"].includes(e.method!) && !signedRoutes.includes(e));
const CROSS_ORIGIN = /did not come from one of Twinleaf's own pages/;

const FOREIGN: [string, Record<string, string>][] = [
  ["a foreign Origin", { origin: "https://attacker.example.test" }],
  ["a foreign Origin on this host's port with another name", { origin: "http://localhost.attacker.example.test:3000" }],
  ["a sibling host (same site, another origin)", { origin: "http://shop.localhost:3000", "sec-fetch-site": "same-site" }],
  ["Origin null (a sandboxed frame or a file)", { origin: "null" }],
  ["an Origin of another scheme", { origin: "file://localhost:3000" }],
  ["Sec-Fetch-Site cross-site, whatever the Origin says", { origin: "http://localhost:3000", "sec-fetch-site": "cross-site" }],
  ["Sec-Fetch-Site none", { "sec-fetch-site": "none" }],
  ["neither Origin nor Sec-Fetch-Site", {}],
  ["a garbled Origin", { origin: "::::" }],
];
const OWN: [string, Record<string, string>][] = [
  ["Origin of this host", { origin: "http://localhost:3000" }],
  ["Sec-Fetch-Site same-origin alone", { "sec-fetch-site": "same-origin" }],
  ["both", SAME_ORIGIN],
];

describe("requests that change state come from this origin", () => {
  test("the walk finds the routes that change state", () => {
    expect(writingRoutes.map((e) => e.id)).toEqual(expect.arrayContaining(["POST /api/v1/labels"]));
  });

  const holders = writingRoutes.flatMap((e) => ROLES.filter((r) => lets(rowOf(e)!, r)).map((role) => [e.id, role, e] as const));
  test.each(holders.flatMap(([id, role, e]) => FOREIGN.map(([how, headers]) => [id, role, how, e, headers] as const)))(
    "%s as %s with %s: 403, nothing written",
    async (_id, role, _how, entry, headers) => {
      await become(role);
      const before = await snapshot(getDb());
      const out = await call(entry, undefined, headers);
      expect(out.status, JSON.stringify(out.body)).toBe(403);
      expect(out.body).toEqual({ error: expect.stringMatching(CROSS_ORIGIN) });
      expect(await snapshot(getDb())).toEqual(before);
    },
  );

  test.each(holders.flatMap(([id, role, e]) => OWN.map(([how, headers]) => [id, role, how, e, headers] as const)))(
    "%s as %s with %s: past the check",
    async (_id, role, _how, entry, headers) => {
      await become(role);
      const out = await call(entry, undefined, headers);
      expect([401, 403], JSON.stringify(out.body)).not.toContain(out.status);
    },
  );

  test.each(writingRoutes.map((e) => [e.id, e] as const))("%s signed out from a foreign origin: refused, nothing written", async (_id, entry) => {
    await become("signed out");
    const before = await snapshot(getDb());
    const out = await call(entry, undefined, { origin: "https://attacker.example.test" });
    expect(out.status).toBe(403);
    expect(await snapshot(getDb())).toEqual(before);
  });

  test.each(routes.filter((e) => e.method === "GET").map((e) => [e.id, e] as const))("%s reads: a link from another site still opens it", async (_id, entry) => {
    await become("admin");
    const out = await call(entry, undefined, { origin: "https://attacker.example.test", "sec-fetch-site": "cross-site" });
    expect(out.body).not.toEqual({ error: expect.stringMatching(CROSS_ORIGIN) });
  });
});

// Signature-checked routes: whoever calls, from wherever, without a valid signature: 400, nothing written.
describe("routes let in by a signature alone", () => {
  beforeAll(() => {
    // As a site with payments set up has them (the values are this walk's own).
    process.env.STRIPE_SECRET_KEY ??= "sk_test_walk";
    process.env.STRIPE_WEBHOOK_SECRET ??= "whsec_walk";
  });
  test("the walk finds the payment webhook", () => {
    expect(signedRoutes.map((e) => e.id)).toEqual(["POST /api/v1/payments/webhook"]);
  });
  const callers: Caller[] = ["admin", "service", "signed out", "lab token"];
  const signatures: [string, Record<string, string>][] = [
    ["no signature", {}],
    ["a made-up signature", { "stripe-signature": "t=1700000000,v1=00" }],
  ];
  test.each(signedRoutes.flatMap((e) => callers.flatMap((c) => signatures.map(([how, h]) => [e.id, c, how, e, h] as const))))(
    "%s as %s with %s: 400, nothing written",
    async (_id, caller, _how, entry, sig) => {
      const authorization = await become(caller);
      const before = await snapshot(getDb());
      const headers = { origin: "https://provider.example.test", ...(authorization ? { authorization } : {}), ...sig };
      const res = await (entry.fn as unknown as (req: Request) => Promise<Response>)(new Request(entry.url!, { method: entry.method, headers, body: "{}" }));
      expect(res.status).toBe(400);
      expect(await res.json()).toEqual({ error: expect.any(String) });
      expect(await snapshot(getDb())).toEqual(before);
    },
  );
});
