/**
 * The service desk from intake to closed: every refusal writes nothing and names its field; every
 * state change the desk makes, and the ones the database refuses.
 */
import { eq, sql } from "drizzle-orm";
import sharp from "sharp";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { outbox, ownerConsents, serviceCases, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { AppError } from "@/lib/auth/errors";
import { startSession } from "@/lib/auth/sessions";
import { ownersOfPair } from "@/lib/owners";
import { changeCaseState, recordFinding } from "@/lib/service/desk";
import { openCase, type IntakeInput } from "@/lib/service/intake";
import { caseByCode, caseMessages, shipmentOfPair } from "@/lib/service/queries";
import { moveCase } from "@/lib/service/states";
import { workshopDay } from "@/lib/workshop-time";
import { failureText } from "./helpers";
import { request } from "../setup/next-request";

const { GET: listRoute, POST: postRoute } = await import("@/app/api/v1/service/cases/route");
const { GET: oneRoute, POST: photoRoute } = await import("@/app/api/v1/service/cases/[code]/route");

const db = () => getDb();
let desk: { id: string };
const people = new Map<string, string>();
/** Shipped pairs with their speakers, handed out one per test so cases do not collide. */
let shipped: { pair: string; pairId: string; L: string; R: string }[] = [];
let unshippedPair = "";
let driveUnit = "";
const take = () => shipped.shift()!;

beforeAll(async () => {
  await seedDemo(db(), { months: 12 });
  for (const r of await db().all<{ id: string; email: string }>(sql`SELECT id, email FROM users`)) people.set(r.email.split("@")[0]!, r.id);
  const [u] = await db().select({ id: users.id }).from(users).where(eq(users.email, "service@demo.twinleaf.test"));
  desk = { id: u!.id };
  shipped = await db().all<{ pair: string; pairId: string; L: string; R: string }>(sql`
    SELECT p.identity AS pair, p.id AS pairId,
      (SELECT i.identity FROM links l JOIN items i ON i.id = l.child_id WHERE l.parent_id = p.id AND l.position = 'L' AND l.ended_at IS NULL AND i.kind = 'speaker') AS L,
      (SELECT i.identity FROM links l JOIN items i ON i.id = l.child_id WHERE l.parent_id = p.id AND l.position = 'R' AND l.ended_at IS NULL AND i.kind = 'speaker') AS R
    FROM items p WHERE p.kind = 'pair' AND p.state = 'shipped'
      -- The demo's own cases hold some pairs already.
      AND NOT EXISTS (SELECT 1 FROM service_cases c WHERE c.pair_id = p.id)
    ORDER BY p.identity LIMIT 30`);
  unshippedPair = (await db().all<{ v: string }>(sql`SELECT identity AS v FROM items WHERE kind = 'pair' AND state <> 'shipped' LIMIT 1`))[0]!.v;
  driveUnit = (await db().all<{ v: string }>(sql`SELECT identity AS v FROM items WHERE kind = 'drive_unit' LIMIT 1`))[0]!.v;
  expect(shipped.length).toBeGreaterThan(10);
}, 180_000);

async function counts() {
  const [row] = await db().all<{ cases: number; events: number; outbox: number; owners: number; consents: number; findings: number; ownerships: number }>(sql`
    SELECT (SELECT count(*) FROM service_cases) AS cases, (SELECT count(*) FROM events) AS events, (SELECT count(*) FROM outbox) AS outbox,
           (SELECT count(*) FROM owners) AS owners, (SELECT count(*) FROM owner_consents) AS consents, (SELECT count(*) FROM case_findings) AS findings,
           (SELECT count(*) FROM ownerships) AS ownerships`);
  return row!;
}

/** The refusal's status and the field it names; the register is left as it was. */
async function refused(fn: () => Promise<unknown>): Promise<{ status: number; fields: string[]; message: string }> {
  const before = await counts();
  let err: unknown;
  try {
    await fn();
  } catch (e) {
    err = e;
  }
  expect(err, "expected a refusal").toBeInstanceOf(AppError);
  expect(await counts()).toEqual(before);
  const e = err as AppError;
  return { status: e.status, fields: Object.keys(e.fieldErrors ?? {}), message: e.message };
}

const owner = (over: Partial<NonNullable<IntakeInput["owner"]>> = {}) => ({ name: "Ada Fenwick", email: "ada.fenwick@example.com", town: "Kelso", country: "GB", consent: true, ...over });
const intake = (serial: string, over: Partial<IntakeInput> = {}): IntakeInput => ({ serial, symptom: "Tweeter silent on the left", returnedBy: "owner", owner: owner(), ...over });
const today = () => workshopDay(new Date());

describe("intake refusals: a reason next to the field, nothing written", () => {
  test.each([
    ["an unknown serial", () => intake("SP-ZZ-1999-000000001-X"), 404, "serial", /no .* in the register/],
    ["a serial that is a drive unit", () => intake(driveUnit), 400, "serial", /drive unit: the desk takes in a speaker or a whole pair/],
    ["a pair not yet shipped", () => intake(unshippedPair), 409, "serial", /has not shipped yet/],
    ["an empty symptom", () => intake(shipped[0]!.L, { symptom: "   " }), 400, "symptom", /Say what/],
    ["a day not on the calendar", () => intake(shipped[0]!.L, { receivedOn: "2025-02-30" }), 400, "receivedOn", /not a day on the calendar/],
    ["a day in the future", () => intake(shipped[0]!.L, { receivedOn: "2999-01-01" }), 400, "receivedOn", /in the future/],
    ["a day before the pair shipped", () => intake(shipped[0]!.L, { receivedOn: "2001-01-01" }), 400, "receivedOn", /before the pair shipped/],
    ["a day in another shape", () => intake(shipped[0]!.L, { receivedOn: "5/12/2026" }), 400, "receivedOn", /YYYY-MM-DD/],
    ["returned by the owner with no owner", () => intake(shipped[0]!.L, { owner: null }), 400, "ownerId", /pick them on record/],
    ["an owner not on record", () => intake(shipped[0]!.L, { owner: null, ownerId: "no-such-owner" }), 404, "ownerId", /not on record/],
    ["an owner picked and given", () => intake(shipped[0]!.L, { ownerId: "x" }), 400, "ownerId", /not both/],
    ["a country that is not two letters", () => intake(shipped[0]!.L, { owner: owner({ country: "Scotland" }) }), 400, "owner.country", /two letters/],
    ["an e-mail that is not one", () => intake(shipped[0]!.L, { owner: owner({ email: "ada@" }) }), 400, "owner.email", /e-mail address/],
    ["an unknown dealer", () => intake(shipped[0]!.L, { dealerCode: "NOPE" }), 404, "dealerCode", /no dealer with the code NOPE/],
  ] as const)("%s", async (_name, input, status, field, words) => {
    const r = await refused(() => openCase(db(), input(), desk));
    expect(r.status).toBe(status);
    expect(r.fields).toContain(field);
    expect(r.message).toMatch(words);
  });

  test("a slipped check character gets “did you mean”", async () => {
    const real = shipped[0]!.L;
    const last = real.slice(-1);
    const slipped = real.slice(0, -1) + (last === "A" ? "B" : "A");
    const r = await refused(() => openCase(db(), intake(slipped), desk));
    expect(r.status).toBe(404);
    expect(r.message).toContain(`Did you mean ${real}`);
  });
});

describe("opening a case", () => {
  test("a speaker typed in lower case without hyphens: pair, partner, dealer, owner, consent, message", async () => {
    // A pair nobody has registered, so that a registration would start its warranty.
    const i = (await Promise.all(shipped.map(async (x) => (await ownersOfPair(db(), x.pairId)).length))).findIndex((n) => n === 0);
    expect(i, "a shipped pair with no owner on record").toBeGreaterThanOrEqual(0);
    const [s] = shipped.splice(i, 1) as [(typeof shipped)[number]];
    const before = await counts();
    const out = await openCase(db(), intake(s.L.toLowerCase().replace(/-/g, " ")), desk);
    expect(out.case.code).toMatch(/^RT\d{4}-\d{4}$/);
    expect(out.case.code.slice(2, 6)).toBe(today().slice(2, 4) + today().slice(5, 7));
    expect(out.item).toEqual({ identity: s.L, kind: "speaker" });
    expect(out.pair).toBe(s.pair);
    expect(out.partner).toBe(s.R);
    expect(out.case.receivedOn).toBe(today());
    const ship = await shipmentOfPair(db(), s.pairId);
    expect(out.case.dealerId).toBe(ship!.dealer!.id);
    expect(out.warranty!.shippedOn).toBe(ship!.shippedOn);
    const after = await counts();
    expect(after.cases - before.cases).toBe(1);
    expect(after.owners - before.owners).toBe(1);
    expect(after.consents - before.consents).toBe(1);
    // The owner the desk names is registered as an owner of the pair (so service mail reaches them)…
    expect(after.ownerships - before.ownerships).toBe(1);
    expect((await ownersOfPair(db(), s.pairId)).map((o) => o.email)).toEqual(["ada.fenwick@example.com"]);
    const mail = await db().select().from(outbox).where(eq(outbox.eventId, out.case.eventId));
    expect(mail).toHaveLength(1);
    expect(mail[0]!.to).toBe("ada.fenwick@example.com");
    expect(mail[0]!.subject).toContain(out.case.code);
    const messages = await caseMessages(db(), out.case.id);
    expect(messages).toMatchObject([{ kind: "received", outcome: "queued", outbox: { status: "pending" } }]);

    // …but that does not start the warranty again: a later case on the pair counts from the same day.
    await changeCaseState(db(), { code: out.case.code, to: "cancelled", reason: "owner collected it unrepaired" }, desk);
    const again = await openCase(db(), intake(s.R, { owner: null, ownerId: out.case.ownerId }), desk);
    expect(out.warranty).toMatchObject({ rule: "shipped", startsOn: ship!.shippedOn });
    expect(again.warranty).toMatchObject({ rule: "shipped", startsOn: ship!.shippedOn });
    expect((await counts()).ownerships - after.ownerships, "the same owner is not registered twice").toBe(0);
  });

  test("the same pair again is refused, naming the open case; so is its partner", async () => {
    const s = take();
    const first = await openCase(db(), intake(s.L, { owner: owner({ email: "twice@example.com" }) }), desk);
    for (const serial of [s.L, s.R, s.pair]) {
      const r = await refused(() => openCase(db(), intake(serial, { owner: owner({ email: "twice@example.com" }) }), desk));
      expect(r.status).toBe(409);
      expect(r.message).toContain(first.case.code);
    }
  });

  test("a whole pair comes back: no partner; codes count on through the month", async () => {
    const a = await openCase(db(), intake(take().pair, { returnedBy: "dealer", owner: null }), desk);
    const b = await openCase(db(), intake(take().pair, { returnedBy: "dealer", owner: null }), desk);
    expect(a.item.kind).toBe("pair");
    expect(a.partner).toBeNull();
    expect(Number(b.case.code.slice(-4))).toBe(Number(a.case.code.slice(-4)) + 1);
    // No owner: the case says why no message went.
    expect(await caseMessages(db(), a.case.id)).toMatchObject([{ kind: "received", outcome: "no_owner", outbox: null }]);
  });

  test("an owner who does not consent gets no message, and the case says so", async () => {
    const out = await openCase(db(), intake(take().R, { owner: owner({ email: "quiet@example.com", consent: false }) }), desk);
    expect(await db().select().from(outbox).where(eq(outbox.eventId, out.case.eventId))).toHaveLength(0);
    expect(await caseMessages(db(), out.case.id)).toMatchObject([{ outcome: "no_consent" }]);
    const [c] = await db().select().from(ownerConsents).where(eq(ownerConsents.ownerId, out.case.ownerId!));
    expect(c!.consent).toBe(false);
  });

  test("an owner with no e-mail: the case says so", async () => {
    const out = await openCase(db(), intake(take().R, { owner: owner({ email: null, name: "Bram Orrin" }) }), desk);
    expect(await caseMessages(db(), out.case.id)).toMatchObject([{ outcome: "no_email" }]);
  });
});

describe("diagnosis and the desk's moves", () => {
  test("findings, diagnosed with its message, waiting for a part, back, and closing refused until sent back", async () => {
    const s = take();
    const { case: c } = await openCase(db(), intake(s.L, { owner: owner({ email: "diag@example.com" }) }), desk);
    // No finding yet.
    let r = await refused(() => changeCaseState(db(), { code: c.code, to: "diagnosed" }, desk));
    expect(r.status).toBe(409);
    expect(r.fields).toContain("finding");
    // The right speaker stayed with the owner; Q is no position of the model.
    r = await refused(() => recordFinding(db(), { code: c.code, side: "R", position: "T", finding: "dead" }, desk));
    expect(r.fields).toEqual(["side"]);
    r = await refused(() => recordFinding(db(), { code: c.code, side: "L", position: "Q", finding: "dead" }, desk));
    expect(r.fields).toEqual(["position"]);
    r = await refused(() => recordFinding(db(), { code: c.code, side: "L", position: "T", finding: "  " }, desk));
    expect(r.fields).toEqual(["finding"]);
    await recordFinding(db(), { code: c.code, side: "L", position: "T", finding: "no output above 3 kHz" }, desk);
    await recordFinding(db(), { code: c.code, side: "L", position: "XO", finding: "burnt resistor" }, desk);

    // Moves the state table does not allow, or that belong to another page.
    r = await refused(() => changeCaseState(db(), { code: c.code, to: "closed" }, desk));
    expect(r.status).toBe(409);
    r = await refused(() => changeCaseState(db(), { code: c.code, to: "repaired" }, desk));
    expect(r.message).toMatch(/its own page/);
    r = await refused(() => changeCaseState(db(), { code: c.code, to: "waiting_part" }, desk));
    expect(r.status).toBe(409);

    const d = await changeCaseState(db(), { code: c.code, from: "received", to: "diagnosed" }, desk);
    expect(d.state).toBe("diagnosed");
    const mail = await db().select().from(outbox).where(eq(outbox.eventId, d.moveEventId));
    expect(mail).toHaveLength(1);
    expect(mail[0]!.text).toContain("no output above 3 kHz");

    // A stale form (the case moved meanwhile) is refused.
    r = await refused(() => changeCaseState(db(), { code: c.code, from: "received", to: "waiting_part" }, desk));
    expect(r.message).toMatch(/moved meanwhile/);

    await changeCaseState(db(), { code: c.code, to: "waiting_part" }, desk);
    r = await refused(() => changeCaseState(db(), { code: c.code, to: "diagnosed" }, desk));
    expect(r.fields).toEqual(["reason"]);
    await changeCaseState(db(), { code: c.code, to: "diagnosed", reason: "the tweeter arrived" }, desk);
    // Only a charged repair waits for payment (this demo pair is in warranty).
    expect(c.id && (await refused(() => changeCaseState(db(), { code: c.code, to: "waiting_payment" }, desk))).message).toMatch(/not charged/);
    await changeCaseState(db(), { code: c.code, to: "waiting_part" }, desk);
    // Only one diagnosis message, however often the case comes back to "diagnosed".
    const messages = await caseMessages(db(), c.id);
    expect(messages.map((m) => m.kind)).toEqual(["received", "diagnosis"]);

    // The repair, the re-test and the return are recorded on their own pages, through moveCase.
    await moveCase(db(), { caseId: c.id, to: "repaired" }, desk);
    await moveCase(db(), { caseId: c.id, to: "tested" }, desk);
    await moveCase(db(), { caseId: c.id, to: "sent_back" }, desk);
    const closed = await changeCaseState(db(), { code: c.code, to: "closed" }, desk);
    expect(closed.state).toBe("closed");
    expect((await caseMessages(db(), c.id)).map((m) => m.kind)).toEqual(["received", "diagnosis", "closed"]);
    r = await refused(() => changeCaseState(db(), { code: c.code, to: "cancelled", reason: "late" }, desk));
    expect(r.status).toBe(409);
    // Closed: the pair may come back again.
    const again = await openCase(db(), intake(s.R, { owner: owner({ email: "diag@example.com" }) }), desk);
    expect(again.case.code).not.toBe(c.code);
  });

  test("a cancellation needs a reason; findings stop after it; the pair may be taken in again", async () => {
    const s = take();
    const { case: c } = await openCase(db(), intake(s.pair, { returnedBy: "dealer", owner: null }), desk);
    const r = await refused(() => changeCaseState(db(), { code: c.code, to: "cancelled", reason: "  " }, desk));
    expect(r.fields).toEqual(["reason"]);
    const x = await changeCaseState(db(), { code: c.code, to: "cancelled", reason: "the dealer took it back unopened" }, desk);
    expect(x.state).toBe("cancelled");
    const f = await refused(() => recordFinding(db(), { code: c.code, side: "L", position: "T", finding: "dead" }, desk));
    expect(f.status).toBe(409);
    await expect(openCase(db(), intake(s.pair, { returnedBy: "dealer", owner: null }), desk)).resolves.toBeTruthy();
  });

  test("the database refuses a state change off the table and any change to the intake", async () => {
    const { case: c } = await openCase(db(), intake(take().pair, { returnedBy: "dealer", owner: null }), desk);
    expect(await failureText(() => db().update(serviceCases).set({ state: "closed" }).where(eq(serviceCases.id, c.id)))).toMatch(/moves only along its states/);
    expect(await failureText(() => db().update(serviceCases).set({ symptom: "changed" }).where(eq(serviceCases.id, c.id)))).toMatch(/only its state moves/);
    expect(await failureText(() => db().delete(serviceCases).where(eq(serviceCases.id, c.id)))).toMatch(/never deleted/);
    expect(await failureText(() => db().update(ownerConsents).set({ consent: true }))).toMatch(/record/);
    expect((await caseByCode(db(), c.code))!.state).toBe("received");
  });
});

describe("the JSON API", () => {
  const BASE = "http://localhost:3000";
  const as = async (role: string) => {
    request.sessionId = (await startSession(people.get(role)!, db())).session.id;
  };
  const post = (body: unknown) => postRoute(new Request(`${BASE}/api/v1/service/cases`, { method: "POST", headers: { origin: BASE, "content-type": "application/json" }, body: JSON.stringify(body) }), { params: Promise.resolve({}) });

  test("POST opens a case: 201 with code, state, speaker, pair, partner and warranty", async () => {
    await as("service");
    const s = take();
    const res = await post({ serial: s.R, symptom: "Hum at low volume", returnedBy: "owner", owner: owner({ email: "api@example.com" }) });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body).toMatchObject({ state: "received", speaker: s.R, pair: s.pair, partner: s.L });
    expect(body.warranty).toMatchObject({ inWarranty: expect.any(Boolean), shippedOn: expect.stringMatching(/^\d{4}-\d{2}-\d{2}$/), endsOn: expect.stringMatching(/^\d{4}-\d{2}-\d{2}$/) });

    const one = await oneRoute(new Request(`${BASE}/api/v1/service/cases/${body.code}`), { params: Promise.resolve({ code: body.code }) });
    expect(one.status).toBe(200);
    const detail = await one.json();
    expect(detail.history[0]).toMatchObject({ type: "case.opened" });
    expect(detail.messages[0]).toMatchObject({ kind: "received", outcome: "queued", delivery: "pending" });
    expect(JSON.stringify(detail)).not.toContain(people.get("service")!);

    const list = await listRoute(new Request(`${BASE}/api/v1/service/cases?state=received`), { params: Promise.resolve({}) });
    expect((await list.json()).cases.map((c: { code: string }) => c.code)).toContain(body.code);
  });

  test.each([
    ["an unknown serial", { serial: "nothing", symptom: "x", returnedBy: "dealer" }, 404],
    ["returnedBy neither", { serial: "x", symptom: "x", returnedBy: "courier" }, 400],
    ["no body fields", {}, 400],
    ["a consent that is not yes or no", { serial: "x", symptom: "x", returnedBy: "owner", owner: { ...owner(), consent: "yes" } }, 400],
  ])("POST with %s: a 4xx in JSON, nothing written", async (_n, body, status) => {
    await as("service");
    const before = await counts();
    const res = await post(body);
    expect(res.status).toBe(status);
    expect((await res.json()).error).toEqual(expect.any(String));
    expect(await counts()).toEqual(before);
  });

  test.each([
    ["lab", 403],
    ["admin", 403],
  ])("POST as %s: %i", async (role, status) => {
    await as(role);
    const res = await post({ serial: take().L, symptom: "x", returnedBy: "dealer" });
    expect(res.status).toBe(status);
  });

  test("GET a bad state or an unknown case: 400 and 404", async () => {
    await as("lab");
    expect((await listRoute(new Request(`${BASE}/api/v1/service/cases?state=lost`), { params: Promise.resolve({}) })).status).toBe(400);
    expect((await oneRoute(new Request(`${BASE}/api/v1/service/cases/RT0000-0001`), { params: Promise.resolve({ code: "RT0000-0001" }) })).status).toBe(404);
  });

  test("photos: a picture is kept with its event; a file that is not one is refused and nothing is kept", async () => {
    await as("service");
    const { case: c } = await openCase(db(), intake(take().pair, { returnedBy: "dealer", owner: null }), desk);
    const raw = Buffer.alloc(32 * 24 * 3, 90);
    const png = new Uint8Array(await sharp(raw, { raw: { width: 32, height: 24, channels: 3 } }).png().toBuffer());
    const send = (name: string, bytes: Uint8Array) => {
      const form = new FormData();
      form.append("file", new File([bytes as BlobPart], name));
      return photoRoute(new Request(`${BASE}/api/v1/service/cases/${c.code}`, { method: "POST", headers: { origin: BASE }, body: form }), { params: Promise.resolve({ code: c.code }) });
    };
    const uploadsBefore = (await db().all<{ n: number }>(sql`SELECT count(*) AS n FROM uploads`))[0]!.n;
    const bad = await send("notes.txt", new TextEncoder().encode("not a picture"));
    expect(bad.status).toBeGreaterThanOrEqual(400);
    expect(bad.status).toBeLessThan(500);
    expect((await db().all<{ n: number }>(sql`SELECT count(*) AS n FROM uploads`))[0]!.n).toBe(uploadsBefore);
    const ok = await send("front.png", png);
    expect(ok.status).toBe(201);
    const [ev] = await db().all<{ n: number }>(sql`SELECT count(*) AS n FROM events WHERE type = 'case.file_added' AND subject_id = ${c.id}`);
    expect(ev!.n).toBe(1);
    await as("lab");
    expect((await send("front.png", png)).status).toBe(403);
  });
});
