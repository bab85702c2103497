/**
 * The containments JSON API on the demo register, called through the route handlers as Next would
 * call them: raising (201 with every affected serial), the guard (401, 403), bad input refused with
 * nothing written, reading one back, the per-dealer CSV (parsed back with papaparse) and the EPCIS
 * 2.0 export (checked against GS1's published JSON schema, tests/fixtures/epcis-validate.ts).
 */
import { eq, sql } from "drizzle-orm";
import Papa from "papaparse";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { startSession } from "@/lib/auth/sessions";
import { AFFECTED_CSV_FIELDS, sendNotices } from "@/lib/containments";
import { AFFECTED_GROUPS } from "@/lib/vocabulary/containments";
import { validate } from "../fixtures/epcis-validate";
import { request } from "../setup/next-request";

const { POST: raise } = await import("@/app/api/v1/containments/route");
const { GET: getOne } = await import("@/app/api/v1/containments/[code]/route");
const { GET: getCsv } = await import("@/app/api/v1/containments/[code]/affected.csv/route");
const { GET: getEpcis } = await import("@/app/api/v1/containments/[code]/epcis/route");

type Route = (req: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>;

const db = () => getDb();
const userId = async (email: string) => (await db().select().from(users).where(eq(users.email, email)))[0]!.id;
const session = async (email: string) => (await startSession(await userId(email), db())).session.id;
let sessions: Record<"quality" | "lab" | "packing", string> = { quality: "", lab: "", packing: "" };
/** A component lot whose shipped pairs went to at least two dealers. */
let lot = { id: "", identity: "" };

beforeAll(async () => {
  await seedDemo(db(), { months: 6 });
  sessions = { quality: await session("quality@demo.twinleaf.test"), lab: await session("lab@demo.twinleaf.test"), packing: await session("packing@demo.twinleaf.test") };
  const [row] = await db().all<{ id: string; identity: string }>(sql`
    SELECT i.id, i.identity FROM items i WHERE i.kind = 'component_lot'
    ORDER BY (SELECT count(DISTINCT s.dealer_id) FROM holdings h JOIN holdings hs ON hs.item_id = h.holder_id AND hs.holder_kind = 'shipment'
                JOIN items s ON s.id = hs.holder_id WHERE h.item_id = i.id AND h.holder_kind = 'pair') DESC, i.identity LIMIT 1`);
  lot = row!;
}, 120_000);

/** What a page of Twinleaf sends: same origin. */
const SAME_ORIGIN = { origin: "http://localhost:3000", "sec-fetch-site": "same-origin" };

async function call(route: Route, path: string, opts: { as?: keyof typeof sessions | null; method?: string; body?: string; params?: Record<string, string> } = {}) {
  request.sessionId = opts.as === null ? null : sessions[opts.as ?? "quality"];
  const method = opts.method ?? (opts.body === undefined ? "GET" : "POST");
  return route(new Request(`http://localhost:3000${path}`, { method, headers: { ...SAME_ORIGIN, "content-type": "application/json" }, body: opts.body }), {
    params: Promise.resolve(opts.params ?? {}),
  });
}

const counts = async () =>
  (await db().all<{ c: number; ci: number; e: number; o: number }>(sql`
    SELECT (SELECT count(*) FROM containments) AS c, (SELECT count(*) FROM containment_items) AS ci,
           (SELECT count(*) FROM events) AS e, (SELECT count(*) FROM outbox) AS o`))[0]!;

interface RaisedJson {
  code: string;
  affected: { serial: string; kind: string; state: string; group: string; dealer?: { code: string; name: string }; owner?: string }[];
}

let raised: RaisedJson;

describe("POST /api/v1/containments", () => {
  test("raises on a lot: 201 with every affected serial, its item state, group, and the dealer of a shipped one", async () => {
    const res = await call(raise, "/api/v1/containments", { body: JSON.stringify({ target: lot.identity, reason: "Capacitors of this lot may leak", severity: "major" }) });
    expect(res.status).toBe(201);
    raised = (await res.json()) as RaisedJson;
    expect(raised.code).toMatch(/^CN\d{4}-\d{4}$/);
    expect(raised.affected.length).toBeGreaterThan(0);
    // Each row against the register itself: the item's state now, and the list written for the code.
    const written = await db().all<{ identity: string; kind: string; grp: string; state: string; dealer: string | null }>(sql`
      SELECT ci.identity, ci.kind, ci."group" AS grp, i.state, d.code AS dealer FROM containment_items ci
      JOIN containments c ON c.id = ci.containment_id JOIN items i ON i.id = ci.item_id LEFT JOIN dealers d ON d.id = ci.dealer_id
      WHERE c.code = ${raised.code}`);
    expect(raised.affected.map((a) => a.serial).sort()).toEqual(written.map((w) => w.identity).sort());
    for (const a of raised.affected) {
      const w = written.find((x) => x.identity === a.serial)!;
      expect(a, a.serial).toMatchObject({ kind: w.kind, state: w.state, group: w.grp });
      expect(AFFECTED_GROUPS).toContain(a.group);
      expect(a.dealer?.code ?? null, a.serial).toBe(a.group === "shipped" ? w.dealer : null);
    }
    expect(new Set(raised.affected.filter((a) => a.dealer).map((a) => a.dealer!.code)).size).toBeGreaterThanOrEqual(2);
  });

  test.each([
    ["signed out", null, 401],
    ["the lab (no quality.work)", "lab", 403],
    ["packing (no quality.work)", "packing", 403],
  ] as const)("%s is refused and nothing is written", async (_who, as, status) => {
    const before = await counts();
    const res = await call(raise, "/api/v1/containments", { as, body: JSON.stringify({ target: lot.identity, reason: "x", severity: "minor" }) });
    expect(res.status).toBe(status);
    expect((await res.json()).error).toBeTruthy();
    expect(await counts()).toEqual(before);
  });

  test.each([
    ["an unknown target", JSON.stringify({ target: "NO-SUCH-LOT-77", reason: "x", severity: "minor" }), 404, "target"],
    ["an empty window", JSON.stringify({ target: { station: "press", from: "2001-01-01", to: "2001-01-02" }, reason: "x", severity: "minor" }), 400, "from"],
    ["a window that ends before it starts", JSON.stringify({ target: { station: "press", from: "2026-03-05", to: "2026-03-01" }, reason: "x", severity: "minor" }), 400, "to"],
    ["no reason", JSON.stringify({ target: "x", severity: "minor" }), 400, "reason"],
    ["a blank reason", JSON.stringify({ target: "x", reason: "   ", severity: "minor" }), 400, "reason"],
    ["an unknown severity", JSON.stringify({ target: "x", reason: "x", severity: "enormous" }), 400, "severity"],
    ["a target of the wrong type", JSON.stringify({ target: 42, reason: "x", severity: "minor" }), 400, "target"],
    ["a window without dates", JSON.stringify({ target: { station: "press" }, reason: "x", severity: "minor" }), 400, "target"],
    ["a body that is not JSON", "{ target: ", 400, null],
    ["a JSON list", "[]", 400, null],
  ] as const)("%s is refused with a message, and nothing is written", async (_what, body, status, field) => {
    const before = await counts();
    const res = await call(raise, "/api/v1/containments", { body: body.replace('"target":"x"', `"target":"${lot.identity}"`) });
    expect(res.status).toBe(status);
    const json = (await res.json()) as { error: string; fieldErrors?: Record<string, string[]> };
    expect(json.error.length).toBeGreaterThan(5);
    if (field) expect(Object.keys(json.fieldErrors ?? {})).toContain(field);
    expect(await counts()).toEqual(before);
  });

  test("a request from another site is refused before anything is read", async () => {
    request.sessionId = sessions.quality;
    const before = await counts();
    const res = await raise(
      new Request("http://localhost:3000/api/v1/containments", {
        method: "POST",
        headers: { origin: "https://elsewhere.example", "sec-fetch-site": "cross-site", "content-type": "application/json" },
        body: JSON.stringify({ target: lot.identity, reason: "x", severity: "minor" }),
      }),
      { params: Promise.resolve({}) },
    );
    expect(res.status).toBe(403);
    expect(await counts()).toEqual(before);
  });
});

describe("reading a containment", () => {
  test("GET gives the containment, its progress, who was told and the affected list, and writes nothing", async () => {
    await sendNotices(db(), { code: raised.code }, { id: await userId("quality@demo.twinleaf.test") });
    const before = await counts();
    const res = await call(getOne, `/api/v1/containments/${raised.code}`, { as: "lab", params: { code: raised.code.toLowerCase() } });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body).toMatchObject({ code: raised.code, target: { label: expect.stringContaining(lot.identity) }, severity: "major", raisedBy: expect.any(String), closedAt: null, approvedBy: null });
    expect(body.progress.total).toBe(raised.affected.length);
    expect(body.progress.dispositioned).toBe(0);
    expect(Object.values(body.progress.byGroup as Record<string, number>).reduce((a, b) => a + b, 0)).toBe(raised.affected.length);
    const dealers = new Set(raised.affected.flatMap((a) => (a.dealer ? [a.dealer.code] : [])));
    expect(body.notices.filter((n: { to: string }) => n.to === "dealer").map((n: { dealerCode: string }) => n.dealerCode).sort()).toEqual([...dealers].sort());
    expect(body.affected).toHaveLength(raised.affected.length);
    // The same words as the answer to raising it: "state" is the item's own, "disposition" the containment's step.
    const byPost = new Map(raised.affected.map((a) => [a.serial, a]));
    for (const a of body.affected as { serial: string; state: string; disposition: string; group: string }[]) {
      expect(a).toMatchObject({ state: byPost.get(a.serial)!.state, group: byPost.get(a.serial)!.group });
      expect(["open", "notified"]).toContain(a.disposition);
    }
    expect(await counts()).toEqual(before);
  });

  test.each([
    ["an unknown code", getOne, "CN9901-0999"],
    ["an unknown code (CSV)", getCsv, "CN9901-0999"],
    ["an unknown code (EPCIS)", getEpcis, "CN9901-0999"],
    ["no code at all", getOne, "not-a-code"],
  ] as const)("%s is 404 in words", async (_what, route, code) => {
    const res = await call(route as Route, `/api/v1/containments/${code}`, { params: { code } });
    expect(res.status).toBe(404);
    expect((await res.json()).error).toMatch(/no containment/i);
  });

  test("signed out, reading is refused", async () => {
    const res = await call(getOne, `/api/v1/containments/${raised.code}`, { as: null, params: { code: raised.code } });
    expect(res.status).toBe(401);
  });
});

describe("the exports", () => {
  test("the CSV of each dealer holds exactly that dealer's serials, and the whole CSV every serial", async () => {
    const dealers = [...new Set(raised.affected.flatMap((a) => (a.dealer ? [a.dealer.code] : [])))];
    expect(dealers.length).toBeGreaterThanOrEqual(2);
    for (const dealer of dealers) {
      const res = await call(getCsv, `/api/v1/containments/${raised.code}/affected.csv?dealer=${dealer}`, { as: "packing", params: { code: raised.code } });
      expect(res.status).toBe(200);
      expect(res.headers.get("content-type")).toMatch(/^text\/csv/);
      expect(res.headers.get("content-disposition")).toBe(`attachment; filename="${raised.code}-${dealer}-affected.csv"`);
      const parsed = Papa.parse<Record<string, string>>(await res.text(), { header: true, skipEmptyLines: true });
      expect(parsed.errors).toEqual([]);
      expect(parsed.meta.fields).toEqual([...AFFECTED_CSV_FIELDS]);
      expect(parsed.data.map((r) => r.Serial).sort()).toEqual(raised.affected.filter((a) => a.dealer?.code === dealer).map((a) => a.serial).sort());
      expect(parsed.data.every((r) => r["Dealer code"] === dealer && r["Where it is"] === "Shipped" && r["Containment state"] === "Notified")).toBe(true);
      expect(parsed.data.every((r) => !Number.isNaN(Date.parse(r["Last change"]!)))).toBe(true);
    }
    const all = await call(getCsv, `/api/v1/containments/${raised.code}/affected.csv`, { params: { code: raised.code } });
    expect(all.headers.get("content-disposition")).toBe(`attachment; filename="${raised.code}-affected.csv"`);
    const rows = Papa.parse<Record<string, string>>(await all.text(), { header: true, skipEmptyLines: true }).data;
    expect(rows.map((r) => r.Serial).sort()).toEqual(raised.affected.map((a) => a.serial).sort());
  });

  test("an unknown dealer is a 404 in JSON", async () => {
    for (const route of [getCsv, getEpcis]) {
      const res = await call(route as Route, `/api/v1/containments/${raised.code}/x?dealer=NO-SUCH-DLR`, { params: { code: raised.code } });
      expect(res.status).toBe(404);
      expect((await res.json()).error).toMatch(/no dealer NO-SUCH-DLR/);
    }
  });

  test("the EPCIS export of one dealer's serials is a valid EPCIS 2.0 document of their events only", async () => {
    const dealer = raised.affected.find((a) => a.dealer)!.dealer!.code;
    const theirs = new Set(raised.affected.filter((a) => a.dealer?.code === dealer).map((a) => encodeURIComponent(a.serial)));
    const before = await counts();
    const res = await call(getEpcis, `/api/v1/containments/${raised.code}/epcis?dealer=${dealer}`, { params: { code: raised.code } });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/ld+json");
    expect(res.headers.get("content-disposition")).toBe(`attachment; filename="${raised.code}-${dealer}-epcis.json"`);
    const doc = await res.json();
    const { own, ajv8 } = validate(doc);
    expect(own.errors).toEqual([]);
    expect(own.success).toBe(true);
    expect(ajv8.errors).toEqual([]);
    const events = doc.epcisBody.eventList as { epcList?: string[]; childEPCs?: string[]; "tw:eventType": string }[];
    const subjects = new Set(events.map((e) => (e.epcList ?? e.childEPCs)![0]!.split("/").at(-1)!));
    // Every one of the dealer's serials has events (its creation at least), and no other serial does.
    expect([...subjects].sort()).toEqual([...theirs].sort());
    expect(await counts()).toEqual(before);
  });
});
