/**
 * One original certificate, whatever the concurrency: the schema holds a certificate to one
 * original print (a partial unique index on certificate_prints), and printing decides original
 * or copy inside its write transaction. Tried through two connections, two processes and the
 * print route itself, 30 first prints at once each time.
 */
import { spawn } from "node:child_process";
import { fileURLToPath } from "node:url";
import { and, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb, openDb } from "@/db";
import { certificatePrints, certificates, events } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { startSession } from "@/lib/auth/sessions";
import { issueCertificate, openablePrint, recordCertificatePrint } from "@/lib/certificates";
import { newId } from "@/lib/auth/tokens";
import { appendEvent } from "@/lib/events/queries";
import { setClock } from "@/lib/clock";
import { failureText } from "./helpers";
import { request } from "../setup/next-request";

const { POST: printRoute } = await import("@/app/api/v1/pairs/[identity]/certificate/route");
const { GET: printedRoute } = await import("@/app/api/v1/pairs/[identity]/certificate/prints/[printId]/route");

const db = () => getDb();
const BASE = "http://localhost:3000";
const ROOT = fileURLToPath(new URL("../../", import.meta.url));
const people = new Map<string, string>();
let readyPairs: { id: string; identity: string }[] = [];

beforeAll(async () => {
  await seedDemo(db(), { months: 6 });
  for (const r of await db().all<{ id: string; email: string }>(sql`SELECT id, email FROM users`)) people.set(r.email.split("@")[0]!, r.id);
  // Pairs that passed their final test and wait to be packed: certificates issued on the first print.
  readyPairs = await db().all<{ id: string; identity: string }>(sql`
    SELECT p.id, p.identity FROM items p WHERE p.kind = 'pair' AND p.state = 'ready_to_pack'
      AND NOT EXISTS (SELECT 1 FROM certificates c WHERE c.pair_id = p.id) ORDER BY p.identity`);
}, 120_000);

/** A certificate of its own for each test, as issuing writes it; the pair's state does not matter to printing. */
async function freshCertificate(): Promise<{ id: string; pairId: string }> {
  const [pair] = await db().all<{ id: string; identity: string }>(sql`
    SELECT p.id, p.identity FROM items p WHERE p.kind = 'pair' AND NOT EXISTS (SELECT 1 FROM certificates c WHERE c.pair_id = p.id)
      AND p.state NOT IN ('ready_to_pack') ORDER BY p.identity LIMIT 1`);
  const id = newId();
  await db().transaction(async (tx) => {
    const eventId = await appendEvent(tx, { actorId: null, station: "packing", type: "certificate.issued", subjectKind: "item", subjectId: pair!.id, data: { identity: pair!.identity, certificateId: id } });
    await tx.insert(certificates).values({ id, pairId: pair!.id, code: newId(), issuedAt: new Date(), eventId });
  });
  return { id, pairId: pair!.id };
}

async function printsOf(certificateId: string) {
  const rows = await db().select().from(certificatePrints).where(eq(certificatePrints.certificateId, certificateId));
  const logged = await db()
    .select({ data: events.data })
    .from(events)
    .where(and(eq(events.type, "certificate.printed"), sql`json_extract(${events.data}, '$.certificateId') = ${certificateId}`));
  return { originals: rows.filter((r) => r.original).length, copies: rows.filter((r) => !r.original).length, loggedOriginals: logged.filter((e) => e.data.copy === false).length, logged: logged.length };
}

describe("the schema", () => {
  test("refuses a second original print of one certificate", async () => {
    const cert = await freshCertificate();
    const row = async (original: boolean) => {
      const eventId = await appendEvent(db(), { actorId: null, station: "packing", type: "certificate.printed", subjectKind: "item", subjectId: cert.pairId, data: { certificateId: cert.id, copy: !original } });
      return db().insert(certificatePrints).values({ id: newId(), certificateId: cert.id, original, actorId: null, eventId, printedAt: new Date() });
    };
    await row(true);
    await row(false);
    expect(await failureText(() => row(true))).toMatch(/UNIQUE constraint failed: certificate_prints\.certificate_id/);
    expect((await printsOf(cert.id)).originals).toBe(1);
  });

  test("a print is never changed or deleted", async () => {
    const cert = await freshCertificate();
    await recordCertificatePrint(db(), cert.id, { actorId: null, copy: false, station: "packing" });
    expect(await failureText(() => db().run(sql`UPDATE certificate_prints SET original = 0 WHERE certificate_id = ${cert.id}`))).toMatch(/never changed/);
    expect(await failureText(() => db().run(sql`DELETE FROM certificate_prints WHERE certificate_id = ${cert.id}`))).toMatch(/never deleted/);
  });
});

describe("30 first prints at once", () => {
  test("through two database connections: one original, 29 copies, and the log says the same", async () => {
    const cert = await freshCertificate();
    const url = process.env.DATABASE_URL!;
    const a = openDb(url);
    const b = openDb(url);
    try {
      const out = await Promise.all(
        Array.from({ length: 30 }, (_, i) => recordCertificatePrint(i % 2 ? a.db : b.db, cert.id, { actorId: people.get("packing")!, copy: false, station: "packing" })),
      );
      expect(out.filter((p) => p.original)).toHaveLength(1);
    } finally {
      a.client.close();
      b.client.close();
    }
    expect(await printsOf(cert.id)).toEqual({ originals: 1, copies: 29, loggedOriginals: 1, logged: 30 });
  });

  test("from two processes, each with its own connection and its own write queue: one original", async () => {
    const cert = await freshCertificate();
    const run = () =>
      new Promise<{ originals: number; prints: number }>((resolve, reject) => {
        const child = spawn(process.execPath, ["--import", "tsx", "--import", "./scripts/server-only.mjs", "tests/fixtures/print-certificate.ts", process.env.DATABASE_URL!, cert.id, people.get("packing")!, "15"], { cwd: ROOT });
        let out = "";
        let err = "";
        child.stdout.on("data", (d) => (out += d));
        child.stderr.on("data", (d) => (err += d));
        child.on("close", (code) => (code === 0 ? resolve(JSON.parse(out)) : reject(new Error(`print process failed (${code}): ${err}`))));
      });
    const [one, two] = await Promise.all([run(), run()]);
    expect(one.prints + two.prints).toBe(30);
    expect(one.originals + two.originals).toBe(1);
    expect(await printsOf(cert.id)).toEqual({ originals: 1, copies: 29, loggedOriginals: 1, logged: 30 });
  }, 60_000);

  test("through the print route, as packers pressing the button: one original, the rest copies", async () => {
    const pair = readyPairs[0]!;
    request.sessionId = (await startSession(people.get("packing")!, db())).session.id;
    const responses = await Promise.all(
      Array.from({ length: 30 }, () =>
        printRoute(new Request(`${BASE}/api/v1/pairs/${encodeURIComponent(pair.identity)}/certificate`, { method: "POST", headers: { origin: BASE } }), {
          params: Promise.resolve({ identity: pair.identity }),
        }),
      ),
    );
    expect(responses.map((r) => r.status)).toEqual(Array(30).fill(303));
    const bodies = (await Promise.all(responses.map((r) => r.json()))) as { print: { original: boolean } }[];
    expect(bodies.filter((b) => b.print.original)).toHaveLength(1);
    const [cert] = await db().select().from(certificates).where(eq(certificates.pairId, pair.id));
    expect(await printsOf(cert!.id)).toEqual({ originals: 1, copies: 29, loggedOriginals: 1, logged: 30 });
    // Issued once, too.
    expect(await db().$count(events, and(eq(events.type, "certificate.issued"), eq(events.subjectId, pair.id)))).toBe(1);
  });
});

describe("a recorded print is opened again only by the person who printed it, for a few minutes", () => {
  test("the printer may reopen it; another person, or the printer after ten minutes, may not, and reading writes nothing", async () => {
    const pair = readyPairs[1]!;
    const cert = await issueCertificate(db(), pair.id, people.get("packing")!);
    const print = await recordCertificatePrint(db(), cert.id, { actorId: people.get("packing")!, copy: false, station: "packing" });
    const open = async (role: string) => {
      request.sessionId = (await startSession(people.get(role)!, db())).session.id;
      return printedRoute(new Request(`${BASE}/api/v1/pairs/${pair.identity}/certificate/prints/${print.id}`), { params: Promise.resolve({ identity: pair.identity, printId: print.id }) });
    };
    const count = async () => (await db().all<{ n: number }>(sql`SELECT (SELECT count(*) FROM events) + (SELECT count(*) FROM certificate_prints) AS n`))[0]!.n;
    const before = await count();
    const mine = await open("packing");
    expect(mine.status).toBe(200);
    expect(mine.headers.get("content-type")).toBe("application/pdf");
    expect((await open("service")).status).toBe(404);
    expect(await openablePrint(db(), { printId: print.id, pairId: readyPairs[2]?.id ?? "other", actorId: people.get("packing")! })).toBeNull();
    setClock(new Date(Date.now() + 11 * 60_000));
    try {
      const late = await open("packing");
      expect(late.status).toBe(404);
      expect((await late.json()).error).toMatch(/only by the person who made it, for 10 minutes/);
    } finally {
      setClock(null);
    }
    expect(await count()).toBe(before);
  });
});
