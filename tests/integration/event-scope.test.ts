/**
 * The event log is read by permission: each role sees what was recorded at its areas' stations
 * (lib/areas.ts) and the register's items, and its own account; another person's account
 * (invitations with e-mail addresses, sign-ins) and machine tokens only an administrator sees.
 * Naming a station in the query narrows the list and never widens it. Role by role, through
 * the real route and through recentEvents as the pages call it.
 */
import { sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { permissionsOf } from "@/lib/auth/permissions";
import { ROLES, type Role } from "@/lib/auth/roles";
import { startSession } from "@/lib/auth/sessions";
import { appendEvent, recentEvents } from "@/lib/events/queries";
import { createItem } from "@/lib/genealogy/graph";
import type { Station } from "@/lib/vocabulary/stations";
import { request } from "../setup/next-request";

const { GET: eventsRoute } = await import("@/app/api/v1/events/route");

const db = () => getDb();
const BASE = "http://localhost:3000";
const ids = new Map<Role, string>();
let itemId = "";
const RUN = `scope-${Date.now().toString(36)}`;

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const rows = await db().all<{ id: string; email: string }>(sql`SELECT id, email FROM users`);
  for (const role of ROLES) ids.set(role, rows.find((r) => r.email === `${role}@demo.twinleaf.test`)!.id);
  itemId = (await db().transaction((tx) => createItem(tx, { kind: "cabinet", identity: `C-SCOPE-${RUN}`, state: "in_route" }, { actorId: null, station: "veneer" }))).id;
  const add = (tag: string, station: Station, subjectKind: string, subjectId: string, type = "item.state_changed", data: Record<string, unknown> = {}) =>
    appendEvent(db(), { actorId: ids.get("admin")!, station, type: type as never, subjectKind, subjectId, data: { ...data, tag: `${RUN}:${tag}` } });
  // Someone else's account: a person just invited, as the probe found them.
  const other = `u-${RUN}`;
  await db().insert(users).values({ id: other, email: "new.person@demo.twinleaf.test", name: "New Person", passwordHash: "x" });
  await add("invitation", "admin", "user", other, "user.invited", { email: "new.person@demo.twinleaf.test" });
  await add("token", "admin", "machine_token", "mt-scope", "machine_token.created", { name: "Bench 9" });
  await add("sign-in of another", "sign-in", "user", other, "user.signed_in", { email: "service@demo.twinleaf.test" });
  await add("another's account at a work station", "veneer", "user", other, "user.roles_changed");
  for (const role of ROLES) await add(`own sign-in ${role}`, "sign-in", "user", ids.get(role)!, "user.signed_in", { email: `${role}@demo.twinleaf.test` });
  // Not items: seen through the station only.
  await add("note at veneer", "veneer", "note", "n-veneer");
  await add("note at the press", "press", "note", "n-press");
  await add("note at the lab bench", "lab-bench", "note", "n-bench");
  await add("note at packing", "packing", "note", "n-packing");
  await add("note at admin", "admin", "note", "n-admin");
  // An item's history, wherever it was recorded: the register's trace, open to every reader.
  await add("item at quality", "quality", "item", itemId);
  await add("item at admin", "admin", "item", itemId);
}, 120_000);

const EVERYONE = ["item at quality", "item at admin"];
/** What each role sees of this run's events (besides its own sign-in). Source: the brief's rule, lib/areas.ts stations per area. */
const SEES: Record<Role, string[]> = {
  veneer: ["note at veneer", ...EVERYONE],
  cabinet: ["note at the press", ...EVERYONE],
  lab: ["note at the lab bench", ...EVERYONE],
  assembly: [...EVERYONE],
  packing: ["note at packing", ...EVERYONE],
  service: [...EVERYONE],
  quality: [...EVERYONE],
  admin: [
    "invitation", "token", "sign-in of another", "another's account at a work station",
    ...ROLES.map((r) => `own sign-in ${r}`),
    "note at veneer", "note at the press", "note at the lab bench", "note at packing", "note at admin",
    ...EVERYONE,
  ],
};

async function feed(role: Role, query = "") {
  request.sessionId = (await startSession(ids.get(role)!, db())).session.id;
  const res = await eventsRoute(new Request(`${BASE}/api/v1/events?limit=500${query}`), { params: Promise.resolve({}) });
  const body = await res.json();
  return { status: res.status, body, tags: ((body.events ?? []) as { data: { tag?: string } }[]).map((e) => e.data.tag).filter((t): t is string => t?.startsWith(`${RUN}:`) ?? false).map((t) => t.slice(RUN.length + 1)) };
}

const expected = (role: Role) => (role === "admin" ? SEES.admin : [...SEES[role], `own sign-in ${role}`]).toSorted();

describe("GET /api/v1/events, role by role", () => {
  test.each(ROLES)("%s sees its areas' stations, the register's items and its own account, nothing of anyone else's account", async (role) => {
    const { status, tags } = await feed(role);
    expect(status).toBe(200);
    expect(tags.toSorted()).toEqual(expected(role));
  });

  test.each(ROLES.filter((r) => r !== "admin"))("%s naming the admin or sign-in station gets no account, e-mail or token events but its own", async (role) => {
    for (const station of ["admin", "sign-in", "seed"]) {
      const { status, body, tags } = await feed(role, `&station=${station}`);
      expect(status).toBe(200);
      expect(tags.toSorted(), station).toEqual([...(station === "admin" ? ["item at admin"] : []), ...(station === "sign-in" ? [`own sign-in ${role}`] : [])].toSorted());
      const others = (body.events as { subjectKind: string; subjectId: string }[]).filter((e) => (e.subjectKind === "user" && e.subjectId !== ids.get(role)) || e.subjectKind === "machine_token");
      expect(others, station).toEqual([]);
      expect(JSON.stringify(body)).not.toContain("new.person@demo.twinleaf.test");
    }
  });

  test("an unknown station is refused with a message", async () => {
    const { status, body } = await feed("veneer", "&station=anywhere");
    expect(status).toBe(400);
    expect(body.fieldErrors.station.join(" ")).toMatch(/station is one of: .*veneer/);
  });
});

describe("recentEvents as the pages call it (Today, area overviews, an item's history)", () => {
  test.each(ROLES)("%s: an area's stations and an item's history are scoped alike", async (role) => {
    const viewer = { id: ids.get(role)!, permissions: permissionsOf([role]) };
    const tagsOf = (rows: { data: Record<string, unknown> }[]) => rows.map((r) => String(r.data.tag ?? "")).filter((t) => t.startsWith(`${RUN}:`)).map((t) => t.slice(RUN.length + 1)).toSorted();
    // The admin area's overview, were it opened: only an administrator sees its account events.
    const admin = await recentEvents(db(), { viewer, stations: ["admin", "sign-in"], limit: 500 });
    expect(tagsOf(admin)).toEqual(expected(role).filter((t) => ["invitation", "token", "sign-in of another", "note at admin", "item at admin"].includes(t) || t.startsWith("own sign-in")));
    // An item's history: the same for everyone who reads the register.
    const history = await recentEvents(db(), { viewer, subjects: { kind: "item", ids: [itemId] }, limit: 500 });
    expect(tagsOf(history)).toEqual(EVERYONE.toSorted());
  });
});
