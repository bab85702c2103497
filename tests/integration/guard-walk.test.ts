/**
 * Walks every server action and route handler under app/ against every role. Everything is
 * derived from the files and the permission map, so an action or route added later is walked
 * without touching this test; only the public actions are named, on purpose, below.
 */
import { readdirSync, readFileSync } from "node:fs";
import { join, relative, sep } from "node:path";
import { fileURLToPath } from "node:url";
import { sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { seedDemo } from "@/db/seed/seed";
import { PERMISSIONS, ROLE_PERMISSIONS, type Permission } from "@/lib/auth/permissions";
import { ROLES, type Role } from "@/lib/auth/roles";
import { createMachineToken, revokeMachineToken } from "@/lib/auth/machine-tokens";
import { startSession } from "@/lib/auth/sessions";
import type { FormState } from "@/lib/forms";
import { RedirectSignal, request } from "../setup/next-request";

// Signed in by setting request.sessionId: tests/integration/setup.ts mocks next/* with tests/setup/next-request.ts.

/** The actions that need no session, as "file#export". Anything else without a permission fails. */
const PUBLIC = new Set([
  "app/(auth)/sign-in/actions.ts#signInAction",
  "app/(auth)/reset/actions.ts#requestResetAction",
  "app/(auth)/reset/actions.ts#resetPasswordAction",
  "app/(auth)/invite/[token]/actions.ts#acceptInviteAction",
  "app/(workshop)/sign-out.ts#signOutAction",
]);

const HTTP_METHODS = new Set(["GET", "HEAD", "POST", "PUT", "PATCH", "DELETE", "OPTIONS"]);

// ---- discovery -------------------------------------------------------------------------------

const ROOT = fileURLToPath(new URL("../../", import.meta.url));
const APP = join(ROOT, "app");
const toPosix = (p: string) => p.split(sep).join("/");

const sourceFiles = (readdirSync(APP, { recursive: true }) as string[])
  .map((f) => toPosix(relative(ROOT, join(APP, f))))
  .filter((f) => /\.(ts|tsx|js|jsx|mjs)$/.test(f))
  .sort();

const USE_SERVER = /^\s*["']use server["'];?\s*$/;
const firstLine = (f: string) => readFileSync(join(ROOT, f), "utf8").split(/\r?\n/, 1)[0] ?? "";
const actionFiles = sourceFiles.filter((f) => USE_SERVER.test(firstLine(f)));
const routeFiles = sourceFiles.filter((f) => /(^|\/)route\.(ts|js)$/.test(f));

/** The URL path of a route file, with a probe value for each dynamic segment. */
function routeTarget(file: string) {
  const segments = file.replace(/^app\//, "").split("/").slice(0, -1);
  const params: Record<string, string | string[]> = {};
  const path = segments
    .filter((s) => !/^\(.*\)$/.test(s) && !s.startsWith("@")) // route groups and slots are not in the URL
    .map((s) => {
      const m = /^\[{1,2}(\.\.\.)?([^\]]+)\]{1,2}$/.exec(s);
      if (!m) return s;
      params[m[2]!] = m[1] ? ["walk-probe"] : "walk-probe";
      return "walk-probe";
    });
  return { url: `http://localhost:3000/${path.join("/")}`, params };
}

type Guarded = ((...args: never[]) => Promise<unknown>) & { permission?: Permission | null; machine?: string | null };

interface Entry {
  id: string;
  kind: "action" | "route";
  fn: Guarded;
  exported: unknown;
  method?: string;
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
    else entries.push({ id: `${file}#${name}`, kind: "action", fn: value as Guarded, exported: value });
  }
}
for (const file of routeFiles) {
  const mod = (await import(/* @vite-ignore */ join(ROOT, file))) as Record<string, unknown>;
  for (const [name, value] of Object.entries(mod)) {
    if (typeof value !== "function") continue; // route segment config such as `dynamic`
    if (!HTTP_METHODS.has(name)) {
      strayExports.push(`${file}#${name}`);
      continue;
    }
    entries.push({ id: `${file}#${name}`, kind: "route", fn: value as Guarded, exported: value, method: name, ...routeTarget(file) });
  }
}

const permissionOf = (e: Entry) => e.fn.permission;
const guarded = entries.filter((e) => typeof permissionOf(e) === "string");
const holds = (role: Role, p: Permission | null | undefined) => p === null || (p !== undefined && ROLE_PERMISSIONS[role].includes(p));

// ---- calling ---------------------------------------------------------------------------------

interface Outcome {
  status: number;
  /** The form state or the JSON body, for messages. */
  body: unknown;
  redirectedTo?: string;
}

/** What a browser sends with a request made by one of the app's own pages. */
const SAME_ORIGIN = { origin: "http://localhost:3000", "sec-fetch-site": "same-origin" };

async function call(e: Entry, headers: Record<string, string> = SAME_ORIGIN): Promise<Outcome> {
  if (e.kind === "action") {
    try {
      const state = (await (e.fn as unknown as (prev: FormState | undefined, fd: FormData) => Promise<FormState>)(undefined, new FormData()));
      return { status: state.status ?? (state.ok ? 200 : 0), body: state };
    } catch (err) {
      // redirect() after a successful body: the guard was passed.
      if (err instanceof RedirectSignal) return { status: 303, body: null, redirectedTo: err.to };
      throw err;
    }
  }
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

/** Every row of every table: a refused call must leave the database exactly as it was. */
async function snapshot(): Promise<Record<string, unknown[]>> {
  const db = getDb();
  const tables = await db.all<{ name: string }>(
    sql`SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' AND name NOT LIKE '__drizzle%' ORDER BY name`,
  );
  const out: Record<string, unknown[]> = {};
  // Ordered by every column, which also works for WITHOUT ROWID tables (holdings).
  for (const { name } of tables) {
    const cols = await db.all<{ name: string }>(sql`SELECT name FROM pragma_table_info(${name})`);
    out[name] = await db.all(sql`SELECT * FROM ${sql.identifier(name)} ORDER BY ${sql.join(cols.map((c) => sql.identifier(c.name)), sql`, `)}`);
  }
  return out;
}

// ---- the walk --------------------------------------------------------------------------------

const userIdByRole = new Map<Role, string>();

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
});

/** Signs the role's demo user in with a session of its own (sign-out ends the one it is given). */
async function signInAs(role: Role | null) {
  request.cookieSets = [];
  request.sessionId = role ? (await startSession(userIdByRole.get(role)!, getDb())).session.id : null;
}

describe("discovery", () => {
  test("finds the server actions and route handlers, and every public allow-list entry", () => {
    expect(entries.filter((e) => e.kind === "action").length).toBeGreaterThan(0);
    expect(entries.filter((e) => e.kind === "route").length).toBeGreaterThan(0);
    // A stale entry would hide nothing today, but would let a renamed action slip through later.
    const ids = new Set(entries.map((e) => e.id));
    for (const id of PUBLIC) expect(ids, id).toContain(id);
  });

  test("every export of a \"use server\" file is an action, and a route file exports only HTTP methods", () => {
    expect(strayExports).toEqual([]);
  });

  test("no \"use server\" directive hides inside another file, where the walk would not see it", () => {
    const inline = sourceFiles.filter((f) => {
      const lines = readFileSync(join(ROOT, f), "utf8").split(/\r?\n/);
      return lines.slice(1).some((l) => USE_SERVER.test(l));
    });
    expect(inline).toEqual([]);
  });
});

describe.each(entries.map((e) => [e.id, e] as const))("%s", (_id, entry) => {
  test("names its permission: one from the map, or null and allow-listed as public", () => {
    expect(Object.hasOwn(entry.fn, "permission"), "made with guardedAction, publicAction or guardedRoute").toBe(true);
    const p = permissionOf(entry);
    if (p === null) {
      expect(PUBLIC, "a public action must be on the allow-list").toContain(entry.id);
    } else {
      expect(PERMISSIONS).toContain(p);
      expect(PUBLIC.has(entry.id), "an allow-listed action must be public").toBe(false);
    }
  });

  const cases = ROLES.map((role) => [role, holds(role, permissionOf(entry)) ? "passes the guard" : "refused with 403, nothing written"] as const);
  test.each(cases)("as %s: %s", async (role) => {
    const permission = permissionOf(entry);
    await signInAs(role);
    if (holds(role, permission)) {
      const out = await call(entry);
      // Past the guard: an empty form may well be answered 400, but never 401 or 403.
      expect([401, 403], JSON.stringify(out.body)).not.toContain(out.status);
      return;
    }
    const before = await snapshot();
    const out = await call(entry);
    expect(out.status, JSON.stringify(out.body)).toBe(403);
    if (entry.kind === "action") expect(out.body).toMatchObject({ ok: false, status: 403 });
    else expect(out.body).toMatchObject({ error: expect.any(String) });
    expect(await snapshot()).toEqual(before);
  });
});

describe("without a session", () => {
  test.each(guarded.map((e) => [e.id, e] as const))("%s answers 401 and changes nothing", async (_id, entry) => {
    await signInAs(null);
    const before = await snapshot();
    const out = await call(entry);
    expect(out.status, JSON.stringify(out.body)).toBe(401);
    expect(await snapshot()).toEqual(before);
  });

  test.each(guarded.map((e) => [e.id, e] as const))("%s answers 401 to an unknown session id and clears the cookie", async (_id, entry) => {
    await signInAs(null);
    request.sessionId = "walk-no-such-session";
    const before = await snapshot();
    const out = await call(entry);
    expect(out.status, JSON.stringify(out.body)).toBe(401);
    expect(request.cookieSets).toContainEqual({ name: "twinleaf_session", value: "" });
    expect(await snapshot()).toEqual(before);
  });

  test.each(entries.filter((e) => permissionOf(e) === null).map((e) => [e.id, e] as const))("public %s is reachable signed out", async (_id, entry) => {
    await signInAs(null);
    const out = await call(entry);
    expect([401, 403], JSON.stringify(out.body)).not.toContain(out.status);
  });
});

// Machine tokens reach the lab's endpoints only: a route opts in with guardedRoute's `machine`.
const MACHINE_ROUTES = "app/api/v1/lab/";
const routes = entries.filter((e) => e.kind === "route");
const machineRoutes = routes.filter((e) => e.fn.machine != null);
const sessionRoutes = routes.filter((e) => e.fn.machine == null);

describe("machine tokens", () => {
  const bearer = { valid: "", revoked: "" };

  beforeAll(async () => {
    const actorId = userIdByRole.get("admin")!;
    bearer.valid = `Bearer ${(await createMachineToken(getDb(), { name: "Walk bench", scope: "lab", actorId })).token}`;
    const old = await createMachineToken(getDb(), { name: "Walk bench, retired", scope: "lab", actorId });
    await revokeMachineToken(getDb(), { id: old.row.id, actorId });
    bearer.revoked = `Bearer ${old.token}`;
  });

  test(`every route says whether it lets machines in, and only routes under ${MACHINE_ROUTES} do`, () => {
    for (const e of routes) expect(Object.hasOwn(e.fn, "machine"), `${e.id} made with guardedRoute`).toBe(true);
    expect(machineRoutes.map((e) => e.id).filter((id) => !id.startsWith(MACHINE_ROUTES))).toEqual([]);
  });

  test.each(sessionRoutes.map((e) => [e.id, e] as const))("%s refuses a valid lab token with 403 and changes nothing", async (_id, entry) => {
    await signInAs(null);
    const before = await snapshot();
    const out = await call(entry, { authorization: bearer.valid });
    expect(out.status, JSON.stringify(out.body)).toBe(403);
    expect(await snapshot()).toEqual(before);
  });

  test.each(machineRoutes.map((e) => [e.id, e] as const))("%s lets a valid lab token past the guard", async (_id, entry) => {
    await signInAs(null);
    const out = await call(entry, { authorization: bearer.valid });
    expect([401, 403], JSON.stringify(out.body)).not.toContain(out.status);
  });

  test.each(machineRoutes.map((e) => [e.id, e] as const))("%s answers a revoked token 401 and changes nothing", async (_id, entry) => {
    await signInAs(null);
    const before = await snapshot();
    const out = await call(entry, { authorization: bearer.revoked });
    expect(out.status, JSON.stringify(out.body)).toBe(401);
    expect(await snapshot()).toEqual(before);
  });
});

// Cross-site request forgery: every route that changes state takes requests from this origin only
// (lib/auth/guard.ts, refuseCrossOrigin), whoever is signed in. OWASP ASVS 4.0.3 V4.2.2.
const writingRoutes = routes.filter((e) => !["GET", "HEAD", "OPTIONS"].includes(e.method!));

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
    expect(writingRoutes.map((e) => e.id)).toEqual(expect.arrayContaining(["app/api/v1/labels/route.ts#POST"]));
  });

  const holders = writingRoutes.flatMap((e) => ROLES.filter((r) => holds(r, permissionOf(e))).map((role) => [e.id, role, e] as const));
  test.each(holders.flatMap(([id, role, e]) => FOREIGN.map(([how, headers]) => [id, role, how, e, headers] as const)))(
    "%s as %s with %s: 403, nothing written",
    async (_id, role, _how, entry, headers) => {
      await signInAs(role);
      const before = await snapshot();
      const out = await call(entry, headers);
      expect(out.status, JSON.stringify(out.body)).toBe(403);
      expect(out.body).toEqual({ error: expect.stringMatching(/did not come from one of Twinleaf's own pages/) });
      expect(await snapshot()).toEqual(before);
    },
  );

  test.each(holders.flatMap(([id, role, e]) => OWN.map(([how, headers]) => [id, role, how, e, headers] as const)))(
    "%s as %s with %s: past the check",
    async (_id, role, _how, entry, headers) => {
      await signInAs(role);
      const out = await call(entry, headers);
      expect([401, 403], JSON.stringify(out.body)).not.toContain(out.status);
    },
  );

  test.each(writingRoutes.map((e) => [e.id, e] as const))("%s signed out from a foreign origin: refused, nothing written", async (_id, entry) => {
    await signInAs(null);
    const before = await snapshot();
    const out = await call(entry, { origin: "https://attacker.example.test" });
    expect(out.status).toBe(403);
    expect(await snapshot()).toEqual(before);
  });

  test.each(routes.filter((e) => e.method === "GET").map((e) => [e.id, e] as const))("%s reads: a link from another site still opens it", async (_id, entry) => {
    await signInAs("admin");
    const out = await call(entry, { origin: "https://attacker.example.test", "sec-fetch-site": "cross-site" });
    expect(out.body).not.toEqual({ error: expect.stringMatching(/did not come from one of Twinleaf's own pages/) });
  });
});
