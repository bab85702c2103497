/**
 * Nothing a GET does writes: every route handler under app/ that answers GET is called by every
 * role (and by a lab bench's machine token) with real serials, prints, mail and uploads from the
 * demo history, between two snapshots of the whole database (each table's row count and a digest
 * of its rows, so an update shows as well as an insert). Found from the files, so a route added
 * later is walked too. Pages are walked the same way on the built server in tests/e2e/writes.e2e.test.ts.
 */
import { createHash } from "node:crypto";
import { readdirSync } from "node:fs";
import { join, relative, sep } from "node:path";
import { fileURLToPath } from "node:url";
import { sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { seedDemo } from "@/db/seed/seed";
import { createMachineToken } from "@/lib/auth/machine-tokens";
import { ROLES } from "@/lib/auth/roles";
import { startSession } from "@/lib/auth/sessions";
import { issueCertificate, recordCertificatePrint } from "@/lib/certificates";
import { raiseContainment } from "@/lib/containments";
import { CARTON_LABEL_LAYOUT } from "@/lib/dispatch";
import { openCase } from "@/lib/service/intake";
import { recordLabelPrints } from "@/lib/labels/queries";
import { request } from "../setup/next-request";

const ROOT = fileURLToPath(new URL("../../", import.meta.url));
const APP = join(ROOT, "app");
const routeFiles = (readdirSync(APP, { recursive: true }) as string[])
  .map((f) => relative(ROOT, join(APP, f)).split(sep).join("/"))
  .filter((f) => /(^|\/)route\.(ts|js)$/.test(f))
  .sort();

const db = () => getDb();
const BASE = "http://localhost:3000";
const people = new Map<string, string>();
/** Real values for each dynamic segment, by its name; each route is called with every combination. */
const values: Record<string, string[]> = {};
let benchToken = "";
/** The query a route needs to reach its body (its other calls are refused with 400, which is fine too). */
const QUERIES: Record<string, string> = {
  "app/api/v1/service/cases/[code]/replacements/route.ts": "side=L&position=T",
};

async function snapshot(): Promise<Record<string, string>> {
  const tables = await db().all<{ name: string }>(sql`SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' AND name NOT LIKE '__drizzle%' ORDER BY name`);
  const out: Record<string, string> = {};
  for (const { name } of tables) {
    const rows = await db().all<Record<string, unknown>>(sql.raw(`SELECT * FROM "${name}"`));
    out[name] = `${rows.length} rows, ${createHash("sha256").update(rows.map((r) => JSON.stringify(r, (_k, v) => (typeof v === "bigint" ? String(v) : v))).sort().join("\n")).digest("hex").slice(0, 16)}`;
  }
  return out;
}

const first = async (q: ReturnType<typeof sql>) => (await db().all<{ v: string | number }>(q)).map((r) => String(r.v));

beforeAll(async () => {
  await seedDemo(db(), { months: 6 });
  for (const r of await db().all<{ id: string; email: string }>(sql`SELECT id, email FROM users`)) people.set(r.email.split("@")[0]!, r.id);
  // A pair whose certificate was never issued: the old GET of its certificate issued and printed it.
  const unissued = await first(sql`SELECT identity AS v FROM items p WHERE kind = 'pair' AND state = 'ready_to_pack' AND NOT EXISTS (SELECT 1 FROM certificates c WHERE c.pair_id = p.id) LIMIT 1`);
  const shipped = await first(sql`SELECT identity AS v FROM items WHERE kind = 'pair' AND state = 'shipped' LIMIT 1`);
  const carton = await first(sql`SELECT identity AS v, id FROM items WHERE kind = 'carton' LIMIT 1`);
  const cabinet = await first(sql`SELECT identity AS v FROM items WHERE kind = 'cabinet' LIMIT 1`);
  // A shipment, for its delivery note.
  const shipment = await first(sql`SELECT identity AS v FROM items WHERE kind = 'shipment' LIMIT 1`);
  // Prints the packer made a moment ago, which the print routes may show again.
  const [printed] = await db().all<{ id: string; identity: string }>(sql`SELECT id, identity FROM items p WHERE kind = 'pair' AND state = 'ready_to_pack' AND NOT EXISTS (SELECT 1 FROM certificates c WHERE c.pair_id = p.id) LIMIT 1 OFFSET 1`);
  const cert = await issueCertificate(db(), printed!.id, people.get("packing")!);
  const certPrint = await recordCertificatePrint(db(), cert.id, { actorId: people.get("packing")!, copy: false, station: "packing" });
  const [cartonRow] = await db().all<{ id: string }>(sql`SELECT id FROM items WHERE identity = ${carton[0]!}`);
  const [labelPrint] = await recordLabelPrints(db(), { items: [{ id: cartonRow!.id, identity: carton[0]!, symbology: "gs1-128" }], layout: CARTON_LABEL_LAYOUT, actorId: people.get("packing")!, station: "packing" });
  values.identity = [...unissued, ...shipped, printed!.identity, ...carton, ...cabinet, ...shipment];
  values.printId = [certPrint.id, String(labelPrint)];
  values.id = [...(await first(sql`SELECT id AS v FROM outbox ORDER BY id DESC LIMIT 1`)), ...(await first(sql`SELECT id AS v FROM uploads LIMIT 1`))];
  values.index = ["0"];
  // A batch's code for the lab's route, and a service case's for the desk's (a case is opened here: the demo has none yet).
  const [returned] = await db().all<{ v: string }>(sql`SELECT identity AS v FROM items WHERE kind = 'pair' AND state = 'shipped' ORDER BY identity DESC LIMIT 1`);
  const opened = await openCase(db(), { serial: returned!.v, symptom: "Hum", returnedBy: "dealer" }, { id: people.get("service")! });
  // And a containment's, for its reads and exports (raised on a shipped pair, so it holds nothing here).
  const contained = await raiseContainment(db(), { target: shipped[0]!, reason: "Walk: suspect glue", severity: "minor" }, { id: people.get("quality")! });
  values.code = [...(await first(sql`SELECT code AS v FROM unit_batches LIMIT 1`)), opened.case.code, contained.code];
  benchToken = (await createMachineToken(db(), { name: "Walk bench", scope: "lab", actorId: people.get("admin")! })).token;
  // Serials and prints must be real: the routes that once wrote are reached only with them.
  for (const name of ["identity", "printId", "code"]) expect(values[name]!.length, `a real value for [${name}]`).toBeGreaterThan(0);
}, 180_000);

/** Every way to fill a route's dynamic segments with the real values above. */
function targets(file: string): { url: string; params: Record<string, string> }[] {
  const segments = file.replace(/^app\//, "").split("/").slice(0, -1).filter((s) => !/^\(.*\)$/.test(s));
  let out = [{ path: [] as string[], params: {} as Record<string, string> }];
  for (const s of segments) {
    const m = /^\[([^\].]+)\]$/.exec(s);
    const options = m ? (values[m[1]!]?.length ? values[m[1]!]! : ["walk-probe"]) : [s];
    out = out.flatMap((t) => options.map((v) => ({ path: [...t.path, m ? encodeURIComponent(v) : v], params: m ? { ...t.params, [m[1]!]: encodeURIComponent(v) } : t.params })));
  }
  const query = QUERIES[file] ? `?${QUERIES[file]}` : "";
  return out.map((t) => ({ url: `${BASE}/${t.path.join("/")}${query}`, params: t.params }));
}

const getRoutes = await Promise.all(
  routeFiles.map(async (file) => ({ file, GET: ((await import(/* @vite-ignore */ join(ROOT, file))) as { GET?: (req: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response> }).GET })),
);
const walked = getRoutes.filter((r) => r.GET);

describe("GET route handlers write nothing", () => {
  test("there are GET routes to walk, the certificate's print among them", () => {
    expect(walked.map((r) => r.file)).toContain("app/api/v1/pairs/[identity]/certificate/prints/[printId]/route.ts");
  });

  test.each(walked.map((r) => [r.file, r] as const))("%s, by every role and a bench", async (_file, route) => {
    const callers: [string, Record<string, string>][] = [];
    for (const role of ROLES) callers.push([role, {}]);
    callers.push(["bench", { authorization: `Bearer ${benchToken}` }]);
    const sessions = new Map<string, string>();
    for (const role of ROLES) sessions.set(role, (await startSession(people.get(role)!, db())).session.id);
    const before = await snapshot();
    const statuses = new Set<number>();
    for (const [who, headers] of callers) {
      request.sessionId = who === "bench" ? null : sessions.get(who)!;
      for (const t of targets(route.file)) {
        const res = await route.GET!(new Request(t.url, { headers }), { params: Promise.resolve(t.params) });
        await res.arrayBuffer();
        expect(res.status, `${who} ${t.url}`).toBeLessThan(500);
        statuses.add(res.status);
      }
    }
    expect(await snapshot()).toEqual(before);
    // Some call was let in: the walk reached the handler's body, not only the guard (when every segment had a real value).
    const real = [...route.file.matchAll(/\[([^\].]+)\]/g)].every((m) => values[m[1]!]?.length);
    if (real) expect([...statuses].some((s) => s < 300), `statuses ${[...statuses].join(", ")}`).toBe(true);
  }, 120_000);
});
