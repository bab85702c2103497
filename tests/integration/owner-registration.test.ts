/**
 * Owners register their pair from the certificate check (issue 14, point 5): double opt-in through
 * a mailed one-time link, limits per address and per e-mail, the same answer whatever is known,
 * and consent withdrawn from a link in any message. Every refusal writes nothing.
 */
import { count, eq, sql } from "drizzle-orm";
import { beforeAll, beforeEach, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { certificates, events, limitHits, mailSecrets, outbox, ownerConsentLinks, ownerConsents, ownerRegistrations, owners, ownerships, serviceCases } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { certificateCode } from "@/lib/certificates/code";
import { appendEvent } from "@/lib/events/queries";
import { registrationsOfOwner, registrationsOfPair, REGISTRATION_LIMIT } from "@/lib/owners/registrations";
import { caseMessages } from "@/lib/service/queries";
import { changeCaseState } from "@/lib/service/desk";
import { makeServiceCase, daysAgo } from "../fixtures/service-case";
import { request } from "../setup/next-request";

const { registerOwnerAction } = await import("@/app/verify/[code]/actions");
const { REGISTRATION_SENT } = await import("@/app/verify/[code]/schemas");
const { confirmRegistrationAction } = await import("@/app/verify/registration/[token]/actions");
const { withdrawConsentAction } = await import("@/app/verify/consent/[token]/actions");

const db = () => getDb();
const SAME_ORIGIN = { origin: "http://localhost:3000", "sec-fetch-site": "same-origin" };
let addressNo = 0;

function form(values: Record<string, string>): FormData {
  const fd = new FormData();
  for (const [k, v] of Object.entries(values)) fd.set(k, v);
  return fd;
}

/** A shipped pair with a certificate (the service fixture's pair), and its certificate code. */
async function shippedPairWithCertificate(): Promise<{ pairId: string; code: string }> {
  const made = await makeServiceCase(db(), { shippedOn: daysAgo(30), state: "received" });
  const [c] = await db().select({ pairId: serviceCases.pairId }).from(serviceCases).where(eq(serviceCases.id, made.caseId));
  const pairId = c!.pairId;
  const code = certificateCode();
  await db().transaction(async (tx) => {
    const eventId = await appendEvent(tx, { actorId: made.actor.id, station: "packing", type: "item.state_changed", subjectKind: "item", subjectId: pairId, data: {} });
    await tx.insert(certificates).values({ id: `cert-${code}`, pairId, code, issuedAt: new Date(), eventId });
  });
  return { pairId, code };
}

/** Every row of the tables an owner's registration can write (limit hits aside). */
async function owned() {
  const counts = await Promise.all(
    [ownerRegistrations, ownerConsentLinks, owners, ownerships, ownerConsents, outbox, mailSecrets, events].map(async (t) => (await db().select({ n: count() }).from(t as typeof owners))[0]!.n),
  );
  return counts.join(",");
}

function register(code: string, over: Record<string, string> = {}) {
  return registerOwnerAction(undefined, form({ code, name: "Iris Holloway", email: "iris@example.test", town: "Kestrel Bay", country: "gb", consent: "on", ...over }));
}

/** The tokens of the newest confirmation mail to this address: [confirm, withdraw?]. */
async function tokensMailedTo(email: string): Promise<string[]> {
  const [m] = await db().select().from(outbox).where(eq(outbox.to, email)).orderBy(sql`${outbox.id} desc`).limit(1);
  if (!m) return [];
  const [kept] = await db().select().from(mailSecrets).where(eq(mailSecrets.outboxId, m.id));
  // The text keeps markers in the secrets' places: order them as they stand in it.
  return Object.entries(kept?.values ?? {})
    .sort(([a], [b]) => m.text.indexOf(a) - m.text.indexOf(b))
    .map(([, value]) => value);
}

beforeAll(async () => {
  await seedDemo(db(), { history: false });
});

beforeEach(() => {
  // Each test comes from its own address, so the address limit of one test does not reach another.
  request.headers = { ...SAME_ORIGIN, "x-twinleaf-peer": `192.0.2.${++addressNo}` };
});

describe("registering from the certificate check", () => {
  test("a registration stays pending, with its mail, until the link's button is pressed; then the owner, ownership and consent exist", async () => {
    const { pairId, code } = await shippedPairWithCertificate();
    const out = await register(code, { email: "Iris.One@Example.test" });
    expect(out).toMatchObject({ ok: true, message: REGISTRATION_SENT });
    const [reg] = await db().select().from(ownerRegistrations).where(eq(ownerRegistrations.pairId, pairId));
    expect(reg).toMatchObject({ email: "iris.one@example.test", country: "GB", consent: true, confirmedAt: null, ownerId: null });
    expect(await db().select().from(ownerships).where(eq(ownerships.itemId, pairId))).toHaveLength(0);
    const [m] = await db().select().from(outbox).where(eq(outbox.to, "iris.one@example.test"));
    const [confirm, withdraw] = await tokensMailedTo("iris.one@example.test");
    expect(confirm && withdraw).toBeTruthy();
    // The outbox keeps markers, never the tokens.
    expect(m!.text).not.toContain(confirm!);
    expect(reg!.tokenHash).not.toContain(confirm!);
    expect((await registrationsOfPair(db(), pairId))[0]).toMatchObject({ status: "pending", consent: true });

    const done = await confirmRegistrationAction(undefined, form({ token: confirm! }));
    expect(done.ok, done.message).toBe(true);
    const [after] = await db().select().from(ownerRegistrations).where(eq(ownerRegistrations.id, reg!.id));
    expect(after!.confirmedAt).not.toBeNull();
    const [ev] = await db().select().from(events).where(sql`${events.type} = 'ownership.registered' AND json_extract(${events.data}, '$.registrationId') = ${reg!.id}`);
    // An owner's own registration starts the warranty: it is not the desk's mark.
    expect(JSON.parse(JSON.stringify(ev!.data))).toMatchObject({ via: "owner registration" });
    expect(ev!.actorId).toBeNull();
    const consents = await db().select().from(ownerConsents).where(eq(ownerConsents.ownerId, after!.ownerId!));
    expect(consents.at(-1)!.consent).toBe(true);
    expect((await registrationsOfPair(db(), pairId))[0]).toMatchObject({ status: "confirmed", consent: true, ownerId: after!.ownerId });
    expect(await registrationsOfOwner(db(), after!.ownerId!)).toHaveLength(1);
  });

  test("the answer is the same for an owner already registered and for an unknown code; neither writes anything", async () => {
    const { code } = await shippedPairWithCertificate();
    await register(code, { email: "twice@example.test" });
    const [confirm] = await tokensMailedTo("twice@example.test");
    expect((await confirmRegistrationAction(undefined, form({ token: confirm! }))).ok).toBe(true);
    const before = await owned();
    // A second registration of the same owner for the same pair: the same polite answer, nothing written.
    expect(await register(code, { email: "twice@example.test" })).toMatchObject({ ok: true, message: REGISTRATION_SENT });
    expect(await owned()).toBe(before);
    // A code no certificate has: the same answer, nothing written.
    expect(await register(certificateCode(), { email: "nobody@example.test" })).toMatchObject({ ok: true, message: REGISTRATION_SENT });
    expect(await owned()).toBe(before);
  });

  test("a second registration while the first waits sends no second mail", async () => {
    const { code } = await shippedPairWithCertificate();
    await register(code, { email: "waiting@example.test" });
    const before = await owned();
    expect(await register(code, { email: "waiting@example.test" })).toMatchObject({ ok: true, message: REGISTRATION_SENT });
    expect(await owned()).toBe(before);
  });

  test.each([
    ["no name", { name: "  " }, "name"],
    ["no e-mail", { email: "" }, "email"],
    ["an e-mail that is not one", { email: "iris-at-example" }, "email"],
    ["no town", { town: "" }, "town"],
    ["a country of three letters", { country: "GBR" }, "country"],
  ])("bad particulars (%s) are refused by the field, nothing written", async (_what, over, field) => {
    const { code } = await shippedPairWithCertificate();
    const before = await owned();
    const out = await register(code, over);
    expect(out).toMatchObject({ ok: false, status: 400 });
    expect(out.fieldErrors?.[field]?.length).toBeGreaterThan(0);
    expect(await owned()).toBe(before);
  });

  test("a registration from another origin is refused, nothing written", async () => {
    const { code } = await shippedPairWithCertificate();
    request.headers = { origin: "https://elsewhere.example.test", "x-twinleaf-peer": "192.0.2.250" };
    const before = await owned();
    expect(await register(code, { email: "cross@example.test" })).toMatchObject({ ok: false, status: 403 });
    expect(await owned()).toBe(before);
  });

  test("over the limit per e-mail, and per address, the answer is the same and nothing is written", async () => {
    const { code } = await shippedPairWithCertificate();
    // Per e-mail: tries from different addresses, each sent for a pair the e-mail does not yet wait for.
    for (let i = 0; i < REGISTRATION_LIMIT.perEmail; i++) {
      request.headers = { ...SAME_ORIGIN, "x-twinleaf-peer": `198.51.100.${i + 1}` };
      const other = await shippedPairWithCertificate();
      await register(other.code, { email: "busy@example.test" });
    }
    request.headers = { ...SAME_ORIGIN, "x-twinleaf-peer": "198.51.100.99" };
    let before = await owned();
    expect(await register(code, { email: "busy@example.test" })).toMatchObject({ ok: true, message: REGISTRATION_SENT });
    expect(await owned()).toBe(before);

    // Per address: many e-mails from one address.
    request.headers = { ...SAME_ORIGIN, "x-twinleaf-peer": "203.0.113.7" };
    for (let i = 0; i < REGISTRATION_LIMIT.perAddress; i++) await register(code, { email: `many${i}@example.test` });
    before = await owned();
    expect(await register(code, { email: "one-more@example.test" })).toMatchObject({ ok: true, message: REGISTRATION_SENT });
    expect(await owned()).toBe(before);
    expect((await db().select({ n: count() }).from(limitHits).where(sql`${limitHits.key} LIKE 'owner-registration:address:203.0.113.%'`))[0]!.n).toBeGreaterThan(0);
  });
});

describe("the confirmation link", () => {
  test.each([
    ["a forged link", "forged-token-that-nobody-ever-mailed-0001"],
    ["a link too short to be one", "short"],
  ])("%s: a clear refusal, nothing written", async (_what, token) => {
    const before = await owned();
    const out = await confirmRegistrationAction(undefined, form({ token }));
    expect(out.ok).toBe(false);
    expect([400, 410]).toContain(out.status);
    expect(await owned()).toBe(before);
  });

  test("a used link is refused the second time, nothing written", async () => {
    const { code } = await shippedPairWithCertificate();
    await register(code, { email: "used@example.test" });
    const [confirm] = await tokensMailedTo("used@example.test");
    expect((await confirmRegistrationAction(undefined, form({ token: confirm! }))).ok).toBe(true);
    const before = await owned();
    expect(await confirmRegistrationAction(undefined, form({ token: confirm! }))).toMatchObject({ ok: false, status: 410 });
    expect(await owned()).toBe(before);
  });

  test("an expired link is refused, nothing written", async () => {
    const { code } = await shippedPairWithCertificate();
    await register(code, { email: "late@example.test" });
    const [confirm] = await tokensMailedTo("late@example.test");
    // Triggers allow no change but the confirmation, so the clock moves instead of the row.
    const { setClock } = await import("@/lib/clock");
    setClock(new Date(Date.now() + 73 * 3600_000));
    try {
      const before = await owned();
      expect(await confirmRegistrationAction(undefined, form({ token: confirm! }))).toMatchObject({ ok: false, status: 410 });
      expect(await owned()).toBe(before);
    } finally {
      setClock(null);
    }
  });

  test("two registrations of one owner for one pair: the second to be confirmed is refused politely, nothing written", async () => {
    const { code } = await shippedPairWithCertificate();
    await register(code, { email: "double@example.test" });
    const [first] = await tokensMailedTo("double@example.test");
    const { setClock } = await import("@/lib/clock");
    // The first link has lapsed for the form (a new one may be sent) but is used just in time... the
    // simpler path: a second registration after the first expired, then both confirmed in turn.
    setClock(new Date(Date.now() + 73 * 3600_000));
    try {
      await register(code, { email: "double@example.test" });
      const [second] = await tokensMailedTo("double@example.test");
      expect(second).not.toBe(first);
      expect((await confirmRegistrationAction(undefined, form({ token: second! }))).ok).toBe(true);
    } finally {
      setClock(null);
    }
    // Back in time the first link is still open: the owner holds the pair already.
    const before = await owned();
    const out = await confirmRegistrationAction(undefined, form({ token: first! }));
    expect(out).toMatchObject({ ok: false, status: 409 });
    expect(out.message).toMatch(/already registered/);
    expect(await owned()).toBe(before);
  });
});

describe("withdrawing consent", () => {
  test("from the confirmation mail before confirming: the registration then records consent withdrawn", async () => {
    const { pairId, code } = await shippedPairWithCertificate();
    await register(code, { email: "early@example.test" });
    const [confirm, withdraw] = await tokensMailedTo("early@example.test");
    expect((await withdrawConsentAction(undefined, form({ token: withdraw! }))).ok).toBe(true);
    expect((await registrationsOfPair(db(), pairId))[0]).toMatchObject({ status: "pending", consent: false });
    expect((await confirmRegistrationAction(undefined, form({ token: confirm! }))).ok).toBe(true);
    const [reg] = await db().select().from(ownerRegistrations).where(eq(ownerRegistrations.pairId, pairId));
    const consents = await db().select().from(ownerConsents).where(eq(ownerConsents.ownerId, reg!.ownerId!));
    expect(consents.at(-1)!.consent).toBe(false);
  });

  test("from a service case message: appended as withdrawn, and the link works once", async () => {
    const made = await makeServiceCase(db(), { shippedOn: daysAgo(30), state: "received" });
    await changeCaseState(db(), { code: made.code, to: "diagnosed" }, made.actor);
    const messages = await caseMessages(db(), made.caseId);
    expect(messages.some((m) => m.outbox)).toBe(true);
    const [withdraw] = await tokensMailedTo(made.ownerEmail!);
    expect(withdraw).toBeTruthy();
    const [owner] = await db().select().from(owners).where(eq(owners.email, made.ownerEmail!));
    const before = (await db().select().from(ownerConsents).where(eq(ownerConsents.ownerId, owner!.id))).length;
    expect((await withdrawConsentAction(undefined, form({ token: withdraw! }))).ok).toBe(true);
    const rows = await db().select().from(ownerConsents).where(eq(ownerConsents.ownerId, owner!.id));
    expect(rows).toHaveLength(before + 1);
    expect(rows.at(-1)!.consent).toBe(false);
    const snap = await owned();
    expect(await withdrawConsentAction(undefined, form({ token: withdraw! }))).toMatchObject({ ok: false, status: 410 });
    expect(await withdrawConsentAction(undefined, form({ token: "forged-token-that-nobody-ever-mailed-0002" }))).toMatchObject({ ok: false, status: 410 });
    expect(await owned()).toBe(snap);
  });
});
