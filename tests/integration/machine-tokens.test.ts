/**
 * Machine tokens: made once and shown once, stored as a hash, revoked once and never deleted,
 * and let in by the guard only where a route under app/api/v1/lab/ asked for them.
 */
import { createHash } from "node:crypto";
import { eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { events, machineTokens } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { AppError } from "@/lib/auth/errors";
import { guardedRoute, MACHINE_ROUTE_ONLY, MACHINE_TOKEN_INVALID } from "@/lib/auth/guard";
import {
  createMachineToken,
  listMachineTokens,
  recorderFor,
  revokeMachineToken,
  verifyMachineToken,
} from "@/lib/auth/machine-tokens";
import type { AuthUser } from "@/lib/auth/sessions";
import { startSession } from "@/lib/auth/sessions";
import type { FormState } from "@/lib/forms";
import { failureText } from "./helpers";
import { request } from "../setup/next-request";

// Signed in by setting request.sessionId: tests/integration/setup.ts mocks next/* with tests/setup/next-request.ts.

const { GET: whoami } = await import("@/app/api/v1/lab/whoami/route");
const { GET: me } = await import("@/app/api/v1/me/route");
const { GET: eventsRoute } = await import("@/app/api/v1/events/route");
const { createTokenAction, revokeTokenAction } = await import("@/app/(workshop)/admin/tokens/actions");

const db = () => getDb();
const ids = new Map<string, string>();

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const rows = await db().all<{ id: string; email: string }>(sql`SELECT id, email FROM users`);
  for (const role of ["admin", "lab"]) ids.set(role, rows.find((r) => r.email === `${role}@demo.twinleaf.test`)!.id);
});

const adminId = () => ids.get("admin")!;

async function signInAs(role: "admin" | "lab" | null) {
  request.sessionId = role ? (await startSession(ids.get(role)!, db())).session.id : null;
}

type Route = (req: Request, ctx: { params: Promise<Record<string, string | string[]>> }) => Promise<Response>;

async function get(route: Route, path: string, authorization?: string) {
  const res = await route(new Request(`http://localhost:3000${path}`, { headers: authorization ? { authorization } : {} }), { params: Promise.resolve({}) });
  return { status: res.status, body: (await res.json()) as Record<string, unknown>, headers: res.headers };
}

/** Every value in every table, as one string, to look for a token that must not be there. */
async function everything(): Promise<string> {
  const tables = await db().all<{ name: string }>(sql`SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%'`);
  const out: unknown[] = [];
  for (const { name } of tables) out.push(await db().all(sql`SELECT * FROM ${sql.identifier(name)}`));
  return JSON.stringify(out);
}

let counter = 0;
const fresh = (label = "Lab bench") => `${label} ${++counter}`;

describe("making and verifying", () => {
  test("a new token is tlm_ + 32 random bytes, verifies, and only its SHA-256 is kept", async () => {
    const { token, row } = await createMachineToken(db(), { name: "  Lab   bench 2 ", scope: "lab", actorId: adminId() });
    expect(token).toMatch(/^tlm_[A-Za-z0-9_-]{43}$/);
    expect(Buffer.from(token.slice(4), "base64url")).toHaveLength(32);
    expect(row.name).toBe("Lab bench 2");
    expect(row.prefix).toBe(token.slice(4, 12));
    expect(row.tokenHash).toBe(createHash("sha256").update(token).digest("hex"));

    const [stored] = await db().select().from(machineTokens).where(eq(machineTokens.id, row.id));
    expect(Object.values(stored!)).not.toContain(token);
    // Not in the row, the event or anywhere else: the token exists only in what was returned.
    expect(await everything()).not.toContain(token.slice(4));

    const [event] = await db().select().from(events).where(eq(events.id, row.eventId!));
    expect(event).toMatchObject({ type: "machine_token.created", station: "admin", actorId: adminId(), subjectKind: "machine_token", subjectId: row.id });
    expect(event!.data).toEqual({ name: "Lab bench 2", prefix: row.prefix, scope: "lab" });

    await expect(verifyMachineToken(db(), token)).resolves.toEqual({ kind: "machine", id: row.id, name: "Lab bench 2", scope: "lab" });
    await expect(verifyMachineToken(db(), `Bearer ${token}`)).resolves.toMatchObject({ id: row.id });
  });

  test.each([
    ["empty", ""],
    ["no prefix", "A".repeat(43)],
    ["short", "tlm_abc"],
    ["too long", `tlm_${"A".repeat(44)}`],
    ["not base64url", `tlm_${"!".repeat(43)}`],
    ["well formed but unknown", `tlm_${"A".repeat(43)}`],
  ])("a %s token does not verify", async (_label, token) => {
    await expect(verifyMachineToken(db(), token)).resolves.toBeNull();
  });

  test("a near miss of a real token does not verify", async () => {
    const { token } = await createMachineToken(db(), { name: fresh(), scope: "lab", actorId: adminId() });
    const last = token.at(-1) === "A" ? "B" : "A";
    await expect(verifyMachineToken(db(), token.slice(0, -1) + last)).resolves.toBeNull();
    await expect(verifyMachineToken(db(), token.toUpperCase())).resolves.toBeNull();
  });

  test("a bad name or scope is refused and writes nothing", async () => {
    const before = await everything();
    for (const name of ["", " ", "x", "y".repeat(81)]) {
      const err = await createMachineToken(db(), { name, scope: "lab", actorId: adminId() }).catch((e: unknown) => e);
      expect(err).toBeInstanceOf(AppError);
      expect((err as AppError).status).toBe(400);
    }
    const err = await createMachineToken(db(), { name: fresh(), scope: "admin" as "lab", actorId: adminId() }).catch((e: unknown) => e);
    expect((err as AppError).status).toBe(400);
    expect(await everything()).toBe(before);
  });

  test("two active tokens cannot share a name; a revoked one's name may be used again", async () => {
    const name = fresh("Impedance rig");
    const first = await createMachineToken(db(), { name, scope: "lab", actorId: adminId() });
    const err = await createMachineToken(db(), { name: name.toUpperCase(), scope: "lab", actorId: adminId() }).catch((e: unknown) => e);
    expect(err).toMatchObject({ status: 409, message: expect.stringContaining("already called") });
    await revokeMachineToken(db(), { id: first.row.id, actorId: adminId() });
    await expect(createMachineToken(db(), { name, scope: "lab", actorId: adminId() })).resolves.toMatchObject({ row: { name } });
  });

  test("the list is newest first, names who made and revoked each, and carries no hash", async () => {
    const older = await createMachineToken(db(), { name: fresh("Listed"), scope: "lab", actorId: adminId() });
    const newer = await createMachineToken(db(), { name: fresh("Listed"), scope: "lab", actorId: adminId() });
    await revokeMachineToken(db(), { id: older.row.id, actorId: adminId() });
    const list = await listMachineTokens(db());
    expect(list.findIndex((t) => t.id === newer.row.id)).toBeLessThan(list.findIndex((t) => t.id === older.row.id));
    const times = list.map((t) => t.createdAt.getTime());
    expect(times).toEqual([...times].sort((a, b) => b - a));
    expect(list.find((t) => t.id === newer.row.id)).toMatchObject({ createdByName: expect.any(String), revokedAt: null, revokedByName: null });
    expect(list.find((t) => t.id === older.row.id)).toMatchObject({ revokedAt: expect.any(Date), revokedByName: expect.any(String) });
    for (const t of list) expect(Object.keys(t)).not.toContain("tokenHash");
  });
});

describe("revoking", () => {
  test("a revoked token stops verifying at once, with an event; revoking again is refused", async () => {
    const { token, row } = await createMachineToken(db(), { name: fresh(), scope: "lab", actorId: adminId() });
    await expect(revokeMachineToken(db(), { id: row.id, actorId: adminId(), reason: "bench retired" })).resolves.toEqual({ name: row.name });
    await expect(verifyMachineToken(db(), token)).resolves.toBeNull();

    const [stored] = await db().select().from(machineTokens).where(eq(machineTokens.id, row.id));
    expect(stored).toMatchObject({ revokedAt: expect.any(Date), revokedBy: adminId(), revokeEventId: expect.any(Number) });
    const [event] = await db().select().from(events).where(eq(events.id, stored!.revokeEventId!));
    expect(event).toMatchObject({ type: "machine_token.revoked", actorId: adminId(), subjectId: row.id, reason: "bench retired" });
    expect(event!.data).toEqual({ name: row.name, prefix: row.prefix, scope: "lab" });

    const before = await everything();
    const again = await revokeMachineToken(db(), { id: row.id, actorId: adminId() }).catch((e: unknown) => e);
    expect(again).toBeInstanceOf(AppError);
    expect(again).toMatchObject({ status: 409, message: expect.stringMatching(/already revoked/) });
    expect(await everything()).toBe(before);
  });

  test("an unknown id is answered 404", async () => {
    await expect(revokeMachineToken(db(), { id: "no-such-token", actorId: adminId() })).rejects.toMatchObject({ status: 404 });
  });

  test("the database refuses deleting a token, renaming it, or un-revoking it", async () => {
    const { row } = await createMachineToken(db(), { name: fresh(), scope: "lab", actorId: adminId() });
    expect(await failureText(() => db().delete(machineTokens).where(eq(machineTokens.id, row.id)))).toMatch(/never deleted/);
    expect(await failureText(() => db().update(machineTokens).set({ name: "Renamed" }).where(eq(machineTokens.id, row.id)))).toMatch(/only be revoked/);
    expect(await failureText(() => db().update(machineTokens).set({ tokenHash: "0".repeat(64) }).where(eq(machineTokens.id, row.id)))).toMatch(/only be revoked/);
    await revokeMachineToken(db(), { id: row.id, actorId: adminId() });
    expect(await failureText(() => db().update(machineTokens).set({ revokedAt: null, revokeEventId: null }).where(eq(machineTokens.id, row.id)))).toMatch(/only be revoked/);
    expect(await failureText(() => db().delete(machineTokens).where(eq(machineTokens.id, row.id)))).toMatch(/never deleted/);
    const [stored] = await db().select().from(machineTokens).where(eq(machineTokens.id, row.id));
    expect(stored).toMatchObject({ name: row.name, tokenHash: row.tokenHash, revokedAt: expect.any(Date) });
  });
});

describe("the guard", () => {
  test("whoami: a valid lab token gets in as the machine", async () => {
    await signInAs(null);
    const { token, row } = await createMachineToken(db(), { name: fresh(), scope: "lab", actorId: adminId() });
    const out = await get(whoami, "/api/v1/lab/whoami", `Bearer ${token}`);
    expect(out).toMatchObject({ status: 200, body: { kind: "machine", name: row.name, scope: "lab" } });
  });

  test("whoami: a revoked, unknown or malformed token is answered 401", async () => {
    await signInAs(null);
    const { token, row } = await createMachineToken(db(), { name: fresh(), scope: "lab", actorId: adminId() });
    await revokeMachineToken(db(), { id: row.id, actorId: adminId() });
    for (const header of [`Bearer ${token}`, `Bearer tlm_${"Q".repeat(43)}`, "Bearer not-a-token", "Bearer", `bearer   ${token}`]) {
      const out = await get(whoami, "/api/v1/lab/whoami", header);
      expect(out.status, header).toBe(401);
      expect(out.body).toEqual({ error: MACHINE_TOKEN_INVALID });
      expect(out.headers.get("www-authenticate")).toMatch(/^Bearer/);
    }
  });

  test("whoami: a lab session still gets in as the user; an admin session without lab.work does not", async () => {
    await signInAs("lab");
    expect(await get(whoami, "/api/v1/lab/whoami")).toMatchObject({ status: 200, body: { kind: "user", name: expect.any(String) } });
    await signInAs("admin");
    expect((await get(whoami, "/api/v1/lab/whoami")).status).toBe(403);
  });

  test("no token and no session is answered 401", async () => {
    await signInAs(null);
    expect((await get(whoami, "/api/v1/lab/whoami")).status).toBe(401);
    expect((await get(me, "/api/v1/me")).status).toBe(401);
  });

  test("a valid lab token on a route that did not ask for machines is refused with 403", async () => {
    await signInAs(null);
    const { token } = await createMachineToken(db(), { name: fresh(), scope: "lab", actorId: adminId() });
    for (const [route, path] of [
      [me, "/api/v1/me"],
      [eventsRoute, "/api/v1/events"],
    ] as const) {
      const out = await get(route, path, `Bearer ${token}`);
      expect(out, path).toMatchObject({ status: 403, body: { error: MACHINE_ROUTE_ONLY } });
    }
  });

  test("a Bearer header is judged alone: a session cookie beside it does not open a non-lab route", async () => {
    await signInAs("admin");
    const { token } = await createMachineToken(db(), { name: fresh(), scope: "lab", actorId: adminId() });
    expect((await get(me, "/api/v1/me", `Bearer ${token}`)).status).toBe(403);
    expect((await get(me, "/api/v1/me")).status).toBe(200);
  });

  test("the route functions say which machine scope they let in", () => {
    expect(whoami.machine).toBe("lab");
    expect(whoami.permission).toBe("lab.work");
    expect(me.machine).toBeNull();
  });

  test("declaring a machine scope on a route guarded by another permission fails when the file loads", () => {
    expect(() => guardedRoute("admin.users", { machine: "lab" }, async () => ({}))).toThrow(/cannot be let in/);
  });

  test("recorderFor: a machine records with no actor, at the lab bench, naming its token", () => {
    const machine = { kind: "machine", id: "mt1", name: "Lab bench 2", scope: "lab" } as const;
    expect(recorderFor({ user: null, machine }, "lab")).toEqual({ actorId: null, station: "lab-bench", data: { machineTokenId: "mt1", machineTokenName: "Lab bench 2" } });
    const user = { id: "u1", name: "Someone" } as AuthUser;
    expect(recorderFor({ user, machine: null }, "lab")).toEqual({ actorId: "u1", station: "lab", data: {} });
  });
});

describe("the admin's actions", () => {
  const form = (fields: Record<string, string>) => {
    const fd = new FormData();
    for (const [k, v] of Object.entries(fields)) fd.set(k, v);
    return fd;
  };

  test("making a token hands it back once in the form state; revoking it works once", async () => {
    await signInAs("admin");
    const name = fresh("Action bench");
    const made: FormState = await createTokenAction(undefined, form({ name, scope: "lab" }));
    expect(made).toMatchObject({ ok: true, data: { name, token: expect.stringMatching(/^tlm_/), prefix: expect.stringMatching(/^tlm_.{8}…$/) } });
    expect(made.message).not.toContain(made.data!.token);
    const principal = await verifyMachineToken(db(), made.data!.token!);
    expect(principal).toMatchObject({ name });

    const revoked = await revokeTokenAction(undefined, form({ tokenId: principal!.id, reason: "lost" }));
    expect(revoked).toMatchObject({ ok: true, message: expect.stringContaining(name) });
    const again = await revokeTokenAction(undefined, form({ tokenId: principal!.id }));
    expect(again).toMatchObject({ ok: false, status: 409, message: expect.stringMatching(/already revoked/) });
  });

  test("bad input gets field messages and writes nothing; a lab user may not make tokens", async () => {
    await signInAs("admin");
    let before = await everything();
    expect(await createTokenAction(undefined, form({ name: " " }))).toMatchObject({ ok: false, status: 400, fieldErrors: { name: [expect.any(String)] } });
    expect(await createTokenAction(undefined, form({ name: fresh(), scope: "admin" }))).toMatchObject({ ok: false, status: 400, fieldErrors: { scope: [expect.any(String)] } });
    expect(await revokeTokenAction(undefined, form({ tokenId: "" }))).toMatchObject({ ok: false, status: 400 });
    expect(await everything()).toBe(before);
    await signInAs("lab");
    before = await everything();
    expect(await createTokenAction(undefined, form({ name: fresh() }))).toMatchObject({ ok: false, status: 403 });
    expect(await everything()).toBe(before);
  });
});
