/** Taking a returned speaker (or a whole pair) in: the case is opened with its intake fixed. */
import "server-only";
import { eq, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { dealers, owners, serviceCases, type ServiceCase } from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { formatCalendarDay } from "@/lib/format";
import { isCalendarDate } from "@/lib/input/dates";
import { checkOwner, ownerById, ownerOnRecord, recordConsent, registerOwnerAtDesk, type OwnerDetails } from "@/lib/owners";
import { pairOfSpeaker } from "@/lib/genealogy/pair-speakers";
import { search } from "@/lib/search/search";
import { workshopDay } from "@/lib/workshop-time";
import type { Actor } from "@/lib/vocabulary/actor";
import { KIND_WORD, isItemKind } from "@/lib/vocabulary/item-kinds";
import { caseCode, casePrefix } from "./code";
import { ownerMailData, ownerMailOutcome, queueOwnerMessage } from "./messages";
import { openCaseOfPair, shipmentOfPair, speakersOfPair, warrantyFacts } from "./queries";
import { SERVICE_STATION } from "./states";
import type { Warranty } from "./warranty";

export interface IntakeInput {
  serial: string;
  symptom: string;
  returnedBy: "owner" | "dealer";
  /** An owner on record… */
  ownerId?: string | null;
  /** …or a new one (found by e-mail when already on record). */
  owner?: (OwnerDetails & { consent: boolean }) | null;
  /** The dealer it came back through, when not the one it was shipped to. */
  dealerCode?: string | null;
  /** YYYY-MM-DD in the workshop's calendar; today when absent. */
  receivedOn?: string | null;
}

export interface IntakeResult {
  case: ServiceCase;
  item: { identity: string; kind: "speaker" | "pair" };
  pair: string;
  partner: string | null;
  warranty: Warranty | null;
}

const refuse = (status: number, field: string, message: string): never => {
  throw new AppError(status, message, { [field]: [message] });
};

/** The speaker or pair a typed or scanned serial names, with search's forgiveness; refusals name the field. */
async function findReturned(db: DbOrTx, serial: string) {
  if (!serial.trim()) refuse(400, "serial", "Scan or type the serial of the speaker or pair that came back.");
  if (serial.length > 64) refuse(400, "serial", "That is too long to be a serial.");
  const answer = await search(db, serial, 0);
  if (!answer.exact || answer.exact.type !== "item") {
    const near = answer.didYouMean.filter((h) => h.type === "item" && (h.kind === "speaker" || h.kind === "pair"));
    if (near.length) refuse(404, "serial", `There is no ${answer.query} in the register. Did you mean ${near.map((h) => (h.type === "item" ? h.identity : "")).join(" or ")}?`);
    refuse(404, "serial", `There is no ${answer.query || "such serial"} in the register. Check the label and try again.`);
  }
  const hit = answer.exact as Extract<NonNullable<typeof answer.exact>, { type: "item" }>;
  if (hit.kind !== "speaker" && hit.kind !== "pair") {
    refuse(400, "serial", `${hit.identity} is a ${isItemKind(hit.kind) ? KIND_WORD[hit.kind] : hit.kind}: the desk takes in a speaker or a whole pair.`);
  }
  return hit;
}

/**
 * Opens a case. Everything is checked before anything is written, and every refusal names its
 * field: an unknown serial (with "did you mean" for a slipped check character), something that is
 * not a speaker or pair, a pair that has not shipped, a pair already in an open case (named), a
 * day that is not on the calendar, in the future or before the pair shipped, an owner not on
 * record. The case's code is allocated inside the transaction; the owner's consent (for a new
 * owner) and the "case received" message go in the same transaction as the case.
 */
export async function openCase(db: DbOrTx, input: IntakeInput, actor: Actor): Promise<IntakeResult> {
  const symptom = input.symptom.trim();
  if (!symptom) refuse(400, "symptom", "Say what the owner or dealer reports is wrong.");
  if (symptom.length > 2000) refuse(400, "symptom", "Keep the symptom to 2000 characters.");
  if (input.returnedBy !== "owner" && input.returnedBy !== "dealer") refuse(400, "returnedBy", "Say who sent it back: the owner or the dealer.");

  const hit = await findReturned(db, input.serial);
  const isPair = hit.kind === "pair";
  const pair = isPair ? { id: hit.id, identity: hit.identity } : ((await pairOfSpeaker(db, hit.id))?.pair ?? null);
  if (!pair) refuse(409, "serial", `${hit.identity} has not been built into a pair, so it has never left the workshop.`);
  const speakers = await speakersOfPair(db, pair!.id);
  const partner = isPair ? null : speakers.L?.id === hit.id ? speakers.R : speakers.L;

  const shipment = await shipmentOfPair(db, pair!.id);
  if (!shipment) refuse(409, "serial", `${isPair ? pair!.identity : `${hit.identity} (pair ${pair!.identity})`} has not shipped yet: the desk takes in what has come back from an owner or a dealer.`);
  const open = await openCaseOfPair(db, pair!.id);
  if (open) refuse(409, "serial", `Pair ${pair!.identity} is already in open case ${open.code}: add to that case instead.`);

  const today = workshopDay(now());
  const receivedOn = input.receivedOn?.trim() || today;
  if (!isCalendarDate(receivedOn)) refuse(400, "receivedOn", /^\d{4}-\d{2}-\d{2}$/.test(receivedOn) ? `${receivedOn} is not a day on the calendar.` : "Give the day it arrived as YYYY-MM-DD.");
  if (receivedOn > today) refuse(400, "receivedOn", `${receivedOn} is in the future: give the day it arrived (today is ${today}).`);
  if (receivedOn < shipment!.shippedOn) refuse(400, "receivedOn", `${receivedOn} is before the pair shipped on ${shipment!.shippedOn}.`);

  let dealerId = shipment!.dealer?.id ?? null;
  if (input.dealerCode?.trim()) {
    const code = input.dealerCode.trim().toUpperCase();
    const [d] = await db.select({ id: dealers.id }).from(dealers).where(eq(dealers.code, code)).limit(1);
    if (!d) refuse(404, "dealerCode", `There is no dealer with the code ${code}.`);
    dealerId = d!.id;
  }

  if (input.ownerId && input.owner) refuse(400, "ownerId", "Pick an owner on record or give a new one, not both.");
  let ownerOnFile: Awaited<ReturnType<typeof ownerById>> = null;
  if (input.ownerId) {
    ownerOnFile = await ownerById(db, input.ownerId);
    if (!ownerOnFile) refuse(404, "ownerId", "That owner is not on record: pick one from the list or give a new one.");
  }
  const newOwner = input.owner ? { ...checkOwner(input.owner, "owner."), consent: input.owner.consent === true } : null;
  if (input.returnedBy === "owner" && !ownerOnFile && !newOwner) refuse(400, "ownerId", "The owner sent it back: pick them on record or give their name, town and country.");

  const at = now();
  try {
    const opened = await db.transaction(async (tx) => {
      // Checked again inside the transaction: another desk may have taken the pair in meanwhile.
      const again = await openCaseOfPair(tx, pair!.id);
      if (again) refuse(409, "serial", `Pair ${pair!.identity} is already in open case ${again.code}: add to that case instead.`);

      let ownerId = ownerOnFile?.id ?? null;
      let consentNow = ownerOnFile?.consent ?? null;
      let email = ownerOnFile?.email ?? null;
      let createdOwner = false;
      if (newOwner) {
        const { consent, ...details } = newOwner;
        const got = await ownerOnRecord(tx, details);
        ownerId = got.ownerId;
        createdOwner = got.newOwner;
        const [o] = await tx.select({ email: owners.email }).from(owners).where(eq(owners.id, ownerId));
        email = o?.email ?? null;
        await recordConsent(tx, { ownerId, consent, data: { via: "service intake" } }, actor);
        consentNow = { given: consent, at };
      }
      // The owner the desk names is on record as an owner of the pair from now on (service mail
      // and notices reach them); this does not move the warranty's start (warrantyFacts).
      if (ownerId) await registerOwnerAtDesk(tx, { pair: pair!, ownerId, newOwner: createdOwner, at }, actor);

      const prefix = casePrefix(workshopDay(at));
      const [last] = await tx.all<{ n: number | null }>(sql`
        SELECT max(CAST(substr(code, ${prefix.length + 1}) AS INTEGER)) AS n FROM service_cases WHERE code LIKE ${`${prefix}%`}`);
      const code = caseCode(workshopDay(at), Number(last?.n ?? 0) + 1);
      const id = newId();
      const outcome = ownerMailOutcome(ownerId ? { email, consent: consentNow } : null);
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station: SERVICE_STATION,
        type: "case.opened",
        subjectKind: "case",
        subjectId: id,
        data: { code, serial: hit.identity, pair: pair!.identity, returnedBy: input.returnedBy, receivedOn, ...ownerMailData("received", outcome) },
        at,
      });
      await tx.insert(serviceCases).values({
        id,
        code,
        itemId: hit.id,
        pairId: pair!.id,
        partnerId: partner?.id ?? null,
        dealerId,
        ownerId,
        returnedBy: input.returnedBy,
        receivedOn,
        symptom,
        state: "received",
        openedAt: at,
        eventId,
      });
      const [row] = await tx.select().from(serviceCases).where(eq(serviceCases.id, id));
      await queueOwnerMessage(tx, { case: row!, kind: "received", eventId });
      return row!;
    });
    return {
      case: opened,
      item: { identity: hit.identity, kind: isPair ? "pair" : "speaker" },
      pair: pair!.identity,
      partner: partner?.identity ?? null,
      warranty: await warrantyFacts(db, opened),
    };
  } catch (e) {
    if (e instanceof AppError) throw e;
    if (isConstraintError(e, "UNIQUE")) throw new AppError(409, `Pair ${pair!.identity} was taken in by another case a moment ago. Nothing was saved.`, { serial: ["This pair is already in an open case."] });
    throw e;
  }
}

/** The item kinds a serial may name at intake (for the form's hint). */
export const INTAKE_KINDS = ["speaker", "pair"] as const;


export interface ReturnedLookUp {
  identity: string | null;
  pairId: string | null;
  /** What was found, in a sentence; or the reason it cannot be taken in. */
  words: string;
  problem: string | null;
  dealer: string | null;
}

/** What intake would find for a serial, read only: the page offers the pair's owners from it. */
export async function lookUpReturned(db: DbOrTx, serial: string): Promise<ReturnedLookUp> {
  let hit: Awaited<ReturnType<typeof findReturned>>;
  try {
    hit = await findReturned(db, serial);
  } catch (e) {
    if (e instanceof AppError) return { identity: null, pairId: null, words: "", problem: e.message, dealer: null };
    throw e;
  }
  const pair = hit.kind === "pair" ? { id: hit.id, identity: hit.identity } : ((await pairOfSpeaker(db, hit.id))?.pair ?? null);
  if (!pair) return { identity: hit.identity, pairId: null, words: "", problem: `${hit.identity} has not been built into a pair.`, dealer: null };
  const [shipment, open] = await Promise.all([shipmentOfPair(db, pair.id), openCaseOfPair(db, pair.id)]);
  const dealer = shipment?.dealer ? `${shipment.dealer.name}, ${shipment.dealer.city}` : null;
  const problem = !shipment ? `Pair ${pair.identity} has not shipped yet.` : open ? `Pair ${pair.identity} is already in open case ${open.code}.` : null;
  const what = hit.kind === "pair" ? `Pair ${pair.identity}` : `Speaker ${hit.identity} of pair ${pair.identity}`;
  return { identity: hit.identity, pairId: pair.id, words: `${what}, shipped ${shipment ? formatCalendarDay(shipment.shippedOn) : "—"}${dealer ? ` to ${dealer}` : ""}.`, problem, dealer };
}
