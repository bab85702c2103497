/**
 * Who, when and where of an event come from the server: a request that names a station, an
 * actor or a time, in its body, its query or its form, changes nothing in the event it writes.
 * Each case forges all three and checks the event against the session's person, the server's
 * station for that work (lib/areas.ts `homeStation`, or the area's own) and the server's clock.
 */
import { desc, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { events } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { startSession } from "@/lib/auth/sessions";
import { request } from "../setup/next-request";

const { POST: labelsRoute } = await import("@/app/api/v1/labels/route");
const { POST: certificateRoute } = await import("@/app/api/v1/pairs/[identity]/certificate/route");
const { POST: cartonLabelRoute } = await import("@/app/api/v1/cartons/[identity]/label/route");
const { moveCartonAction } = await import("@/app/(workshop)/packing/actions");

const db = () => getDb();
const BASE = "http://localhost:3000";
const people = new Map<string, string>();
let pair = "";
let carton = "";
const LONG_AGO = "2001-02-03T04:05:06.000Z";
const forged = () => ({ station: "admin", actor: people.get("admin")!, actorId: people.get("admin")!, at: LONG_AGO });
const forgedQuery = () => new URLSearchParams(forged()).toString();

beforeAll(async () => {
  await seedDemo(db(), { months: 6 });
  for (const r of await db().all<{ id: string; email: string }>(sql`SELECT id, email FROM users`)) people.set(r.email.split("@")[0]!, r.id);
  pair = (await db().all<{ v: string }>(sql`SELECT identity AS v FROM items WHERE kind = 'pair' AND state = 'ready_to_pack' LIMIT 1`))[0]!.v;
  carton = (await db().all<{ v: string }>(sql`SELECT identity AS v FROM items WHERE kind = 'carton' AND state = 'packed' LIMIT 1`))[0]!.v;
}, 180_000);

const post = (path: string, body?: unknown) =>
  new Request(`${BASE}${path}`, { method: "POST", headers: { origin: BASE, ...(body ? { "content-type": "application/json" } : {}) }, body: body ? JSON.stringify(body) : undefined });

/** Each case: the role that sends it, the request with every field forged, and the event type and station the server must record. */
const CASES: [string, string, () => Promise<unknown>, string, string][] = [
  ["labels: body and query", "veneer", () => labelsRoute(post(`/api/v1/labels?${forgedQuery()}`, { identities: [pair], layout: "a4-3x8", ...forged() }), { params: Promise.resolve({}) }), "label.printed", "veneer"],
  ["certificate print: query", "packing", () => certificateRoute(post(`/api/v1/pairs/${encodeURIComponent(pair)}/certificate?${forgedQuery()}`), { params: Promise.resolve({ identity: encodeURIComponent(pair) }) }), "certificate.printed", "packing"],
  ["carton label: query", "packing", () => cartonLabelRoute(post(`/api/v1/cartons/${encodeURIComponent(carton)}/label?${forgedQuery()}`), { params: Promise.resolve({ identity: encodeURIComponent(carton) }) }), "label.printed", "packing"],
  [
    "moving a carton: form fields",
    "packing",
    () => {
      const form = new FormData();
      form.set("carton", carton);
      form.set("location", "Rack Q, shelf 4");
      for (const [k, v] of Object.entries(forged())) form.set(k, v);
      return moveCartonAction(undefined, form);
    },
    "carton.moved",
    "packing",
  ],
];

describe("a request naming a station, an actor or a time", () => {
  test.each(CASES)("%s (as %s): the event takes them from the server", async (_name, role, send, type, station) => {
    request.sessionId = (await startSession(people.get(role)!, db())).session.id;
    const started = Date.now();
    const out = await send();
    if (out instanceof Response) expect(out.status, await out.clone().text()).toBeLessThan(400);
    else expect(out).toMatchObject({ ok: true });
    const [event] = await db().select().from(events).where(eq(events.type, type)).orderBy(desc(events.id)).limit(1);
    expect(event!.station).toBe(station);
    expect(event!.actorId).toBe(people.get(role));
    expect(event!.at.getTime()).toBeGreaterThanOrEqual(started - 1000);
    expect(event!.at.getTime()).toBeLessThanOrEqual(Date.now() + 1000);
    expect(JSON.stringify(event!.data)).not.toContain(LONG_AGO);
  });
});
