/**
 * What an attacker sends, against the real actions and route handlers: ways off the site after
 * sign-in, path parameters Next decoded into a "%", bodies past their route's limit (declared
 * and chunked), over-long e-mail addresses, and secrets echoed back into a failed form.
 * Each case failed before the fix that names it (a redirect to //host, a 500, a body read in
 * full, an invitation sent, the confirmation returned).
 */
import { readdirSync, readFileSync } from "node:fs";
import { join, relative, sep } from "node:path";
import { fileURLToPath } from "node:url";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { ROLES } from "@/lib/auth/roles";
import { startSession } from "@/lib/auth/sessions";
import type { FormState } from "@/lib/forms";
import { KiB, MiB } from "@/lib/input/sizes";
import { NotFoundSignal, RedirectSignal, request } from "../setup/next-request";

// Signed in by setting request.sessionId: tests/integration/setup.ts mocks next/* with tests/setup/next-request.ts.

const db = () => getDb();
const ids = new Map<string, string>();

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  for (const u of await db().select().from(users)) ids.set(u.email.split("@")[0]!, u.id);
});

async function signInAs(role: string | null) {
  request.sessionId = role ? (await startSession(ids.get(role)!, db())).session.id : null;
}

type Action = (prev: FormState | undefined, fd: FormData) => Promise<FormState>;

async function run(action: Action, fields: Record<string, string>): Promise<{ state?: FormState; redirectedTo?: string }> {
  const fd = new FormData();
  for (const [k, v] of Object.entries(fields)) fd.append(k, v);
  try {
    return { state: await action(undefined, fd) };
  } catch (e) {
    if (e instanceof RedirectSignal) return { redirectedTo: e.to };
    throw e;
  }
}

const { signInAction } = await import("@/app/(auth)/sign-in/actions");
const { acceptInviteAction } = await import("@/app/(auth)/invite/[token]/actions");
const { resetPasswordAction } = await import("@/app/(auth)/reset/actions");
const { inviteAction } = await import("@/app/(workshop)/admin/users/actions/invite");
const { dispositionAction } = await import("@/app/(workshop)/quality/actions");

describe("after sign-in, only a page of Twinleaf", () => {
  // The probe's request and its variants (OWASP: unvalidated redirects; URL Standard parsing).
  test.each([
    ["/.//evil.example", "/"],
    ["/..//evil.example", "/"],
    ["/%2e%2e//evil.example", "/"],
    ["/%2F%2Fevil.example", "/"],
    ["//evil.example", "/"],
    ["/\\evil.example", "/"],
    ["https://evil.example/", "/"],
    ["/lab?batch=7", "/lab?batch=7"],
  ])("next=%j goes to %j", async (next, to) => {
    await signInAs(null);
    const out = await run(signInAction as Action, { email: "lab@demo.twinleaf.test", password: "twinleaf-demo", next });
    expect(out.redirectedTo).toBe(to);
  });
});

describe("the disposition form returns only to a page of Twinleaf", () => {
  test.each([["/.//evil.example"], ["/%2e%2e//evil.example"], ["//evil.example"]])("back=%j is refused before anything is recorded", async (back) => {
    await signInAs("quality");
    const out = await run(dispositionAction as Action, { ncId: "no-such-nc", back, disposition: "scrap", scrapSide: "L", reason: "a reason of some words" });
    expect(out.redirectedTo).toBeUndefined();
    expect(out.state?.status).toBe(400);
    expect(out.state?.fieldErrors?.back?.[0]).toMatch(/page of Twinleaf/);
  });
});

describe("a failed form never sends a secret back", () => {
  const SECRETS = { password: "hunter2-hunter2-x", confirm: "hunter2-hunter2-y", token: "t".repeat(40), secret: "s3cr3t", newPassword: "np-np-np-np-np" };

  test.each([
    ["accepting an invitation", acceptInviteAction],
    ["setting a new password", resetPasswordAction],
  ])("%s with two different passwords", async (_name, action) => {
    await signInAs(null);
    const out = await run(action as Action, { ...SECRETS, extra: "kept?" });
    expect(out.state?.ok).toBe(false);
    expect(out.state?.fieldErrors?.confirm?.[0]).toMatch(/differ/);
    expect(Object.keys(out.state?.values ?? {})).toEqual([]);
  });

  test("signing in with a wrong password echoes the address only", async () => {
    await signInAs(null);
    const out = await run(signInAction as Action, { email: "lab@demo.twinleaf.test", password: "wrong-wrong-wrong" });
    expect(out.state?.ok).toBe(false);
    expect(out.state?.values).toEqual({ email: "lab@demo.twinleaf.test" });
  });

  // Every action under app/, called signed out and signed in as each role, with secrets
  // beside whatever else: whatever it answers, none of them comes back.
  const ROOT = fileURLToPath(new URL("../../", import.meta.url));
  const files = (readdirSync(join(ROOT, "app"), { recursive: true }) as string[])
    .map((f) => relative(ROOT, join(ROOT, "app", f)).split(sep).join("/"))
    .filter((f) => /\.(ts|tsx)$/.test(f) && /^\s*["']use server["']/.test(readFileSync(join(ROOT, f), "utf8")))
    .sort();
  const skip = new Set(["signOutAction"]);

  test.each(files)("%s", async (file) => {
    const mod = (await import(/* @vite-ignore */ join(ROOT, file))) as Record<string, unknown>;
    for (const [name, fn] of Object.entries(mod)) {
      if (typeof fn !== "function" || skip.has(name)) continue;
      for (const role of [null, ...ROLES]) {
        await signInAs(role);
        const out = await run(fn as Action, { ...SECRETS, email: "x", ncId: "none" });
        const echoed = Object.keys(out.state?.values ?? {});
        for (const key of Object.keys(SECRETS)) expect(echoed, `${file}#${name} as ${role ?? "nobody"}`).not.toContain(key);
      }
    }
  });
});

describe("one e-mail address rule (RFC 5321 §4.5.3.1: at most 254 characters)", () => {
  test.each([
    [`${"a".repeat(64)}@${"b".repeat(63)}.${"c".repeat(63)}.${"d".repeat(57)}.test`, "refused: 307 characters", false],
    [`${"a".repeat(65)}@example.test`, "refused: local part over 64", false],
    ["new.person@example.test", "accepted", true],
  ])("inviting %#: %s", async (email, _what, ok) => {
    await signInAs("admin");
    const out = await run(inviteAction as Action, { name: "New Person", email, roles: "lab" });
    if (ok) expect(out.state?.ok).toBe(true);
    else {
      expect(out.state?.status).toBe(400);
      expect(out.state?.fieldErrors?.email?.[0]).toMatch(/e-mail address/);
      expect((await db().select().from(users).where(eq(users.email, email.toLowerCase()))).length).toBe(0);
    }
  });
});

// ---- route handlers -------------------------------------------------------------------------

type Route = (req: Request, ctx: { params: Promise<Record<string, string | string[]>> }) => Promise<Response>;
const get = (route: Route, params: Record<string, string>) => route(new Request("http://localhost:3000/api/v1/x"), { params: Promise.resolve(params) });
/** A print is a POST from one of the app's own pages. */
const post =
  (route: Route): Route =>
  (_req, ctx) =>
    route(new Request("http://localhost:3000/api/v1/x", { method: "POST", headers: { origin: "http://localhost:3000", "sec-fetch-site": "same-origin" } }), ctx);

const itemRoutes: [string, Route][] = [
  ["item", (await import("@/app/api/v1/items/[identity]/route")).GET as Route],
  ["trace", (await import("@/app/api/v1/items/[identity]/trace/route")).GET as Route],
  ["barcode", (await import("@/app/api/v1/items/[identity]/barcode/route")).GET as Route],
  ["epcis", (await import("@/app/api/v1/items/[identity]/epcis/route")).GET as Route],
  ["certificate", post((await import("@/app/api/v1/pairs/[identity]/certificate/route")).POST as Route)],
  ["carton label", post((await import("@/app/api/v1/cartons/[identity]/label/route")).POST as Route)],
];

describe("a path parameter Next already decoded is not decoded again", () => {
  // "%", "%zz" and "%E0%A4%A" are what Next hands over for /…/%25, /…/%25zz, /…/%25E0%25A4%25A.
  const cases = itemRoutes.flatMap(([name, route]) => ["%", "%zz", "%E0%A4%A", "S%2"].map((v) => [name, v, route] as const));
  test.each(cases)("%s with %j answers 404", async (_name, value, route) => {
    await signInAs("packing");
    const res = await get(route, { identity: value });
    expect(res.status).toBe(404);
    expect((await res.json()).error).toEqual(expect.any(String));
  });

  test.each([["\u0000"], ["a\nb"], ["x".repeat(500)]])("a value no serial could be (%#) answers 404", async (value) => {
    await signInAs("packing");
    const res = await get(itemRoutes[0]![1], { identity: value });
    expect(res.status).toBe(404);
  });

  test("a page's parameter is checked the same way", async () => {
    const { pageParam } = await import("@/lib/auth/guard");
    expect(pageParam("%")).toBe("%");
    expect(() => pageParam("a\u0000")).toThrow(NotFoundSignal);
    expect(() => pageParam("")).toThrow(NotFoundSignal);
  });
});

/** A body sent in pieces with no Content-Length, as a chunked upload arrives. */
function chunked(bytes: number, piece = 64 * KiB): ReadableStream<Uint8Array> {
  let sent = 0;
  return new ReadableStream({
    pull(controller) {
      if (sent >= bytes) return controller.close();
      const n = Math.min(piece, bytes - sent);
      sent += n;
      controller.enqueue(new Uint8Array(n).fill(0x20));
    },
  });
}

const { POST: postLabels } = await import("@/app/api/v1/labels/route");
const { POST: postResponses } = await import("@/app/api/v1/lab/responses/route");
const { POST: postPhotos } = await import("@/app/api/v1/veneer/photos/route");

describe("bodies past their route's limit get 413 with a message", () => {
  const post = (route: Route, body: BodyInit, headers: Record<string, string>) =>
    route(new Request("http://localhost:3000/api/v1/x", { method: "POST", body, headers: { origin: "http://localhost:3000", ...headers }, duplex: "half" } as RequestInit), {
      params: Promise.resolve({}),
    });

  test.each([
    ["labels, declared 50 MB", postLabels as Route, "packing", { "content-type": "application/json", "content-length": String(50 * MiB) }, () => "{}"],
    ["labels, chunked 1 MB", postLabels as Route, "packing", { "content-type": "application/json" }, () => chunked(MiB)],
    ["lab responses, chunked 30 MB", postResponses as Route, "lab", { "content-type": "application/json" }, () => chunked(30 * MiB, MiB)],
    ["veneer photos, declared 500 MB", postPhotos as Route, "veneer", { "content-type": "multipart/form-data; boundary=x", "content-length": String(500 * MiB) }, () => "--x--"],
    ["veneer photos, chunked 200 MB", postPhotos as Route, "veneer", { "content-type": "multipart/form-data; boundary=x" }, () => chunked(200 * MiB, 4 * MiB)],
  ])("%s", async (_name, route, role, headers, body) => {
    await signInAs(role);
    const res = await post(route, body(), headers);
    expect(res.status).toBe(413);
    expect((await res.json()).error).toMatch(/KB|MB|too large/);
  });

  test("a body within the limit that is not JSON gets 400", async () => {
    await signInAs("packing");
    const res = await post(postLabels as Route, "{not json", { "content-type": "application/json" });
    expect(res.status).toBe(400);
  });
});
