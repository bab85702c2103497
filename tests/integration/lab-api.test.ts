import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { events, responses, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { createMachineToken } from "@/lib/auth/machine-tokens";
import { batchUnitsView, registerBatch } from "@/lib/lab/units";

// Requests carry no session (tests/setup/next-request.ts): a test bench calls with its machine token only.

const { POST: postResponses } = await import("@/app/api/v1/lab/responses/route");
const { POST: postTs } = await import("@/app/api/v1/lab/ts-params/route");
const { GET: getBatch } = await import("@/app/api/v1/lab/batches/[code]/route");

const db = () => getDb();
let token = "";
let batchCode = "";
let serials: string[] = [];

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const [admin] = await db().select().from(users).where(eq(users.email, "admin@demo.twinleaf.test"));
  const [lab] = await db().select().from(users).where(eq(users.email, "lab@demo.twinleaf.test"));
  token = (await createMachineToken(db(), { name: "Bench A", scope: "lab", actorId: admin!.id })).token;
  const b = await registerBatch(db(), { partType: "tweeter", partNumber: "T-API", maker: "Maker", lot: "L", receivedOn: "2026-11-30", makerSerials: [], count: 2 }, { id: lab!.id });
  batchCode = b.code;
  serials = (await batchUnitsView(db(), b.id)).map((u) => u.identity);
});

const call = (route: (req: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>, path: string, init: RequestInit & { params?: Record<string, string> } = {}) =>
  route(new Request(`http://localhost:3000${path}`, { ...init, headers: { "content-type": "application/json", authorization: `Bearer ${token}`, ...(init.headers ?? {}) } }), { params: Promise.resolve(init.params ?? {}) });

const file = (serial: string, level: number) => [`# ${serial}`, ...[1000, 2000, 4000, 8000, 16000].map((hz) => `${hz},${level}`)].join("\n");

describe("the lab's JSON API for test benches", () => {
  test("a bench reads a batch's serials, posts responses and parameters; events name the bench, with no person as actor", async () => {
    const batch = await call(getBatch, `/api/v1/lab/batches/${batchCode}`, { method: "GET", params: { code: batchCode } });
    expect(batch.status).toBe(200);
    expect((await batch.json()).units.map((u: { serial: string }) => u.serial)).toEqual(serials);

    const res = await call(postResponses, "/api/v1/lab/responses", { method: "POST", body: JSON.stringify({ batch: batchCode, files: serials.map((s, i) => ({ name: `run-${i}.csv`, text: file(s, 90 + i / 10) })) }) });
    expect(res.status).toBe(201);
    const [first] = await db().select().from(responses).orderBy(responses.id).limit(1);
    expect(first!.source).toBe("api");
    const [event] = await db().select().from(events).where(eq(events.id, first!.eventId));
    expect(event).toMatchObject({ actorId: null, station: "lab-bench", data: expect.objectContaining({ machineTokenName: "Bench A" }) });

    const ts = await call(postTs, "/api/v1/lab/ts-params", { method: "POST", body: JSON.stringify({ batch: batchCode, units: [{ serial: serials[0], fs: 900, qes: 1.1, qms: 2.2, re: 4.7 }] }) });
    expect(ts.status).toBe(201);
  });

  test("a bad file is refused with the line named and nothing saved", async () => {
    const before = (await db().select().from(responses)).length;
    const res = await call(postResponses, "/api/v1/lab/responses", { method: "POST", body: JSON.stringify({ batch: batchCode, files: [{ name: "x.txt", text: `# ${serials[0]}\n1000,90\n900,91\n2000,90` }] }) });
    expect(res.status).toBe(400);
    const body = await res.json();
    expect(body.fieldErrors.files.join(" ")).toMatch(/x\.txt, line 3/);
    expect((await db().select().from(responses)).length).toBe(before);
  });

  test("an unknown token is refused", async () => {
    const res = await call(postResponses, "/api/v1/lab/responses", { method: "POST", headers: { authorization: `Bearer tlm_${"A".repeat(43)}` }, body: JSON.stringify({ files: [{ name: "a", text: "x" }] }) });
    expect(res.status).toBe(401);
  });
});
