/**
 * The way home of a service case: a tested case packed in a new carton and shipped to the owner
 * or the dealer, the case sent back with the owner's "on its way" message, then closed; and every
 * refusal (wrong state, no carrier or tracking, a day out of range, nobody to send it to) writes
 * nothing. Invented data (tests/fixtures/service-repair.ts).
 */
import { and, eq, isNull, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { dealers, items, links, outbox, serviceCases, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { setClock } from "@/lib/clock";
import { extractText, getDocumentProxy } from "unpdf";
import { cartonLabelData, renderCartonLabel } from "@/lib/dispatch";
import { createItem, fit } from "@/lib/genealogy/graph";
import { recordConsent, ownerOnRecord } from "@/lib/owners";
import { allocateSerial } from "@/lib/serials/allocator";
import { changeCaseState } from "@/lib/service/desk";
import { caseDetailJson } from "@/lib/service/json";
import { caseReturnOf, sendCaseBack } from "@/lib/service/return";
import { moveCase } from "@/lib/service/states";
import { repairedCase, shippedPair } from "../fixtures/service-repair";

const db = () => getDb();
let desk = "";
let dealerId = "";
let ownerId = "";
let n = 0;

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  desk = (await db().select().from(users).where(eq(users.email, "service@demo.twinleaf.test")))[0]!.id;
  dealerId = (await db().select().from(dealers).where(eq(dealers.active, true)).limit(1))[0]!.id;
  ownerId = await db().transaction(async (tx) => {
    const o = await ownerOnRecord(tx, { name: "Ada Fernhill", email: "ada.fernhill@example.test", town: "Lowbridge", country: "GB" });
    await recordConsent(tx, { ownerId: o.ownerId, consent: true }, { id: desk });
    return o.ownerId;
  });
}, 90_000);

/** A case whose right tweeter was replaced, moved on to "tested" (the re-test has its own tests). */
async function tested(opts: { owner?: boolean; dealer?: boolean; state?: "repaired" | "tested" } = {}) {
  setClock(new Date("2026-12-04T10:00:00Z"));
  const built = await shippedPair(db(), desk);
  const c = await repairedCase(
    db(),
    { pair: built.pair, speakers: built.speakers, failed: built.tweeters.R, side: "R", code: `RT2612-8${String(++n).padStart(3, "0")}`, ownerId: opts.owner === false ? undefined : ownerId, dealerId: opts.dealer === false ? undefined : dealerId },
    desk,
  );
  if ((opts.state ?? "tested") === "tested") await moveCase(db(), { caseId: c.caseId, from: "repaired", to: "tested" }, { id: desk });
  return c;
}

const good = (code: string) => ({ code, to: "owner", shippedOn: "2026-12-04", carrier: "Parcel Ferry", tracking: "PF 1234 5678" });
const counts = async () => (await db().all<{ n: number }>(sql`SELECT (SELECT count(*) FROM events) + (SELECT count(*) FROM items) * 1000 + (SELECT count(*) FROM outbox) * 1000000 AS n`))[0]!.n;
const stateOf = async (id: string) => (await db().select().from(serviceCases).where(eq(serviceCases.id, id)))[0]!.state;

describe("sending a tested case back", () => {
  test("to the owner: a carton and a shipment, the case sent back, the owner's message queued, and the case shows it", async () => {
    const c = await tested();
    const r = await sendCaseBack(db(), good(c.code), { id: desk });
    expect(await stateOf(c.caseId)).toBe("sent_back");
    expect(r.carton.kind).toBe("carton");
    expect(r.shipment).toMatchObject({ kind: "shipment", state: "shipped", dealerId: null });
    const [inShipment] = await db().select().from(links).where(and(eq(links.childId, r.carton.id), isNull(links.endedAt)));
    expect(inShipment).toMatchObject({ parentId: r.shipment.id, position: "1" });
    const [carton] = await db().select().from(items).where(eq(items.id, r.carton.id));
    expect(carton).toMatchObject({ state: "shipped" });
    expect(carton!.attrs).toMatchObject({ case: c.code, speaker: c.speakers.R.identity });
    const mails = await db().select().from(outbox).where(eq(outbox.eventId, r.moveEventId));
    expect(mails).toHaveLength(1);
    expect(mails[0]).toMatchObject({ to: "ada.fernhill@example.test" });
    expect(mails[0]!.subject).toContain("on its way");
    expect(mails[0]!.text).toContain("on its way back to you");
    // One speaker came back: its carton's label names the pair with that speaker alone.
    const label = await cartonLabelData(db(), r.carton.identity);
    expect(label).toMatchObject({ contents: "R", pair: c.pair.identity, left: null, right: c.speakers.R.identity, packedOn: "2026-12-04" });
    expect(label.element.bwipText).toContain(`(21)${c.pair.identity}`);
    const { text } = await extractText(await getDocumentProxy(new Uint8Array(await renderCartonLabel(label))), { mergePages: true });
    // The heading is letter-spaced, so the PDF's text runs hold a space between letters.
    expect(text.replace(/\s+/g, "")).toContain("RIGHTSPEAKERONLY");
    expect(text).toContain(c.speakers.R.identity);
    expect(text).not.toContain("Left speaker");
    expect(await caseReturnOf(db(), c.caseId)).toMatchObject({ to: "owner", carton: r.carton.identity, shipment: r.shipment.identity, carrier: "Parcel Ferry", tracking: "PF 1234 5678", shippedOn: "2026-12-04" });
    // Then the desk closes it, with the "closed" message.
    const closed = await changeCaseState(db(), { code: c.code, to: "closed" }, { id: desk });
    expect(closed.state).toBe("closed");
    expect(await db().select().from(outbox).where(eq(outbox.eventId, closed.moveEventId))).toHaveLength(1);
    // The JSON case shows the way home, by serials.
    const [row] = await db().select().from(serviceCases).where(eq(serviceCases.id, c.caseId));
    const detail = await caseDetailJson(db(), row!);
    expect(detail.sentBack).toMatchObject({ to: "owner", carton: r.carton.identity, shipment: r.shipment.identity, tracking: "PF 1234 5678" });
    expect(detail.state).toBe("closed");
  });

  test("a whole pair to the dealer: the pair leaves its old carton for the new one, whose label prints as usual", async () => {
    setClock(new Date("2026-12-04T10:00:00Z"));
    const built = await shippedPair(db(), desk);
    // The pair's first carton, as packing made it.
    const old = await db().transaction(async (tx) => {
      const by = { actorId: desk, station: "packing" as const };
      const carton = await createItem(tx, { kind: "carton", identity: await allocateSerial(tx, { kind: "carton", code: "TL20", year: 2026 }), state: "shipped", modelId: built.pair.modelId }, by);
      await fit(tx, { parent: carton, child: built.pair, position: "PAIR" }, by);
      return carton;
    });
    const c = await repairedCase(db(), { pair: built.pair, speakers: built.speakers, failed: built.tweeters.R, side: "R", code: `RT2612-8${String(++n).padStart(3, "0")}`, ownerId, dealerId, wholePair: true }, desk);
    await moveCase(db(), { caseId: c.caseId, from: "repaired", to: "tested" }, { id: desk });
    const r = await sendCaseBack(db(), { ...good(c.code), to: "dealer" }, { id: desk });
    const [shipment] = await db().select().from(items).where(eq(items.id, r.shipment.id));
    expect(shipment!.dealerId).toBe(dealerId);
    const held = await db().select().from(links).where(and(eq(links.childId, built.pair.id), isNull(links.endedAt), sql`${links.parentKind} = 'carton'`));
    expect(held.map((l) => [l.parentId, l.position])).toEqual([[r.carton.id, "PAIR"]]);
    expect(held[0]!.parentId).not.toBe(old.id);
    const label = await cartonLabelData(db(), r.carton.identity);
    expect(label).toMatchObject({ contents: "pair", carton: r.carton.identity, pair: built.pair.identity, left: built.speakers.L.identity, right: built.speakers.R.identity, packedOn: "2026-12-04" });
    expect(await caseReturnOf(db(), c.caseId)).toMatchObject({ to: "dealer" });
    // The owner is still told, naming the dealer.
    const [mail] = await db().select().from(outbox).where(eq(outbox.eventId, r.moveEventId));
    const [dealer] = await db().select().from(dealers).where(eq(dealers.id, dealerId));
    expect(mail!.text).toContain(`to ${dealer!.name}`);
  });
});

describe("refusals write nothing", () => {
  test.each([
    ["a case not yet tested", { state: "repaired" as const }, {}, 409, "only a case whose pair passed its test again"],
    ["no carrier", {}, { carrier: "  " }, 400, "Name the carrier"],
    ["no tracking number", {}, { tracking: "" }, 400, "tracking number"],
    ["a carrier name over 80 characters", {}, { carrier: "x".repeat(81) }, 400, "At most 80"],
    ["a day in the future", {}, { shippedOn: "2026-12-05" }, 400, "in the future"],
    ["a day before the case came in", {}, { shippedOn: "2026-12-03" }, 400, "before it came in"],
    ["not a day", {}, { shippedOn: "4/12/2026" }, 400, "YYYY-MM-DD"],
    ["neither owner nor dealer", {}, { to: "neighbour" }, 400, "owner or to the dealer"],
    ["to the owner when the case names none", { owner: false }, {}, 400, "names no owner"],
    ["to the dealer when none is on record", { dealer: false }, { to: "dealer" }, 400, "dealer is not on record"],
  ])("%s", async (_name, setup, change, status, words) => {
    const c = await tested(setup);
    const before = await counts();
    const stateBefore = await stateOf(c.caseId);
    await expect(sendCaseBack(db(), { ...good(c.code), ...change }, { id: desk })).rejects.toMatchObject({ status, message: expect.stringContaining(words) });
    expect(await counts()).toBe(before);
    expect(await stateOf(c.caseId)).toBe(stateBefore);
  });

  test("an unknown case, and a case already sent back", async () => {
    await expect(sendCaseBack(db(), good("RT2612-7999"), { id: desk })).rejects.toMatchObject({ status: 404 });
    const c = await tested();
    await sendCaseBack(db(), good(c.code), { id: desk });
    const before = await counts();
    await expect(sendCaseBack(db(), good(c.code), { id: desk })).rejects.toMatchObject({ status: 409, message: expect.stringContaining("Sent back") });
    expect(await counts()).toBe(before);
  });
});
