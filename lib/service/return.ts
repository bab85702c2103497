/**
 * The way home: a tested case's speaker (or pair) is packed in a new carton and shipped back to
 * the owner or to the dealer, the case moves to "sent back" and the owner is told, all in one
 * transaction. Bad input writes nothing.
 */
import "server-only";
import { and, desc, eq } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db";
import { dealers, events, models, shipmentDetails, type Item } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { isCalendarDay, isoDay } from "@/lib/dispatch/dates";
import { assignSscc, cartonOf, packingGs1Settings } from "@/lib/dispatch";
import { appendEvent } from "@/lib/events/queries";
import { changeState, createItem, fit, itemById, removeFrom, type Recorder } from "@/lib/genealogy/graph";
import { allocateSerial } from "@/lib/serials/allocator";
import { isValidGtin } from "@/lib/serials/gs1";
import type { Actor } from "@/lib/vocabulary/actor";
import { CASE_STATE_WORDS } from "@/lib/vocabulary/case-states";
import { ownerMailData, ownerMailOutcome, queueOwnerMessage } from "./messages";
import { caseByCode, caseParticulars } from "./queries";
import { moveCase, SERVICE_STATION } from "./states";

export const RETURN_TO = ["owner", "dealer"] as const;
export type ReturnTo = (typeof RETURN_TO)[number];

/** Shipment serials carry a dealer's code; a parcel to an owner carries this one (service return). */
export const OWNER_SHIPMENT_CODE = "SVC";

const TEXT_MAX = 80;
const oneLine = (v: string) => v.trim().replace(/\s+/g, " ");

export interface ReturnInput {
  code: string;
  to: string;
  /** YYYY-MM-DD, the day it left: not before the case was received, not after today. */
  shippedOn: string;
  carrier: string;
  tracking: string;
}

/** What the case shows of its way home, read back from its "case.sent_back" event. */
export interface CaseReturn {
  to: ReturnTo;
  sentTo: string;
  carton: string;
  shipment: string;
  shippedOn: string;
  carrier: string;
  tracking: string;
}

/**
 * Packs and ships a tested case back. When the whole pair came back, the pair leaves its old
 * carton and sits in the new one at PAIR, so its carton label prints as usual; when one speaker
 * came back it stays fitted in its pair (a thing has one holder), and the carton records the
 * speaker it carries. The move to "sent back" carries the owner's "on its way" message.
 */
export async function sendCaseBack(db: Db, input: ReturnInput, actor: Actor): Promise<{ code: string; carton: Item; shipment: Item; moveEventId: number }> {
  const c = await caseByCode(db, input.code);
  if (!c) throw new AppError(404, `There is no service case ${input.code.trim()}.`);
  if (c.state !== "tested") {
    throw new AppError(409, `Case ${c.code} is “${CASE_STATE_WORDS[c.state]}”: only a case whose pair passed its test again is sent back. Nothing was shipped.`);
  }
  const p = await caseParticulars(db, c);

  const errors: Record<string, string[]> = {};
  const add = (field: string, message: string) => (errors[field] ??= []).push(message);
  const to = (RETURN_TO as readonly string[]).includes(input.to) ? (input.to as ReturnTo) : null;
  const [dealer] = c.dealerId ? await db.select().from(dealers).where(eq(dealers.id, c.dealerId)).limit(1) : [];
  if (!to) add("to", "Choose whether it goes back to the owner or to the dealer.");
  else if (to === "dealer" && !dealer) add("to", "The pair's dealer is not on record: send it to the owner.");
  else if (to === "dealer" && !dealer!.active) add("to", `${dealer!.name} is no longer an active dealer: send it to the owner.`);
  else if (to === "owner" && !p.owner) add("to", "The case names no owner: send it to the dealer, or record the owner first.");

  const today = isoDay(now());
  const shippedOn = input.shippedOn.trim();
  if (!isCalendarDay(shippedOn)) add("shippedOn", "Give the day it left, as YYYY-MM-DD.");
  else if (shippedOn > today) add("shippedOn", `The day is in the future: it cannot have left after today (${today}).`);
  else if (shippedOn < c.receivedOn) add("shippedOn", `It cannot have left before it came in (${c.receivedOn}).`);

  const carrier = oneLine(input.carrier);
  const tracking = oneLine(input.tracking);
  if (!carrier) add("carrier", "Name the carrier.");
  else if (carrier.length > TEXT_MAX) add("carrier", `At most ${TEXT_MAX} characters.`);
  if (!tracking) add("tracking", "Give the carrier's tracking number.");
  else if (tracking.length > TEXT_MAX) add("tracking", `At most ${TEXT_MAX} characters.`);

  const [model] = p.pair.modelId ? await db.select().from(models).where(eq(models.id, p.pair.modelId)).limit(1) : [];
  if (!model) add("to", `${p.pair.identity} has no model, so its carton has no GTIN.`);
  else if (!isValidGtin(model.pairGtin) || model.pairGtin.length !== 14) add("to", `The pair GTIN of ${model.code} is not a valid GTIN-14; ask an administrator to correct the model.`);

  if (Object.keys(errors).length) {
    const all = Object.values(errors).flat();
    throw new AppError(400, all.length === 1 ? `Nothing was shipped: ${all[0]}` : "Nothing was shipped: some fields need attention.", errors);
  }

  const sentTo = to === "dealer" ? `to ${dealer!.name}` : "to you";
  const sentToDesk = to === "dealer" ? `${dealer!.name}, ${dealer!.city}` : `${p.owner!.name}, ${p.owner!.town} (${p.owner!.country})`;
  const owner = p.owner;
  const outcome = ownerMailOutcome(owner);
  const gs1 = packingGs1Settings();
  const by: Recorder = { actorId: actor.id, station: SERVICE_STATION };

  return db.transaction(async (tx) => {
    const item = (await itemById(tx, c.itemId))!;
    const year = Number(shippedOn.slice(0, 4));
    const cartonIdentity = await allocateSerial(tx, { kind: "carton", code: model!.code, year });
    const carton = await createItem(
      tx,
      {
        kind: "carton",
        identity: cartonIdentity,
        state: "packed",
        modelId: model!.id,
        finishId: item.finishId,
        attrs: { gtin: model!.pairGtin, packedOn: shippedOn, case: c.code, ...(item.kind === "speaker" ? { speaker: item.identity } : {}) },
      },
      by,
    );
    // A carton on its way back is a logistic unit like any other: it gets its SSCC.
    await assignSscc(tx, carton, gs1);
    if (item.kind === "pair") {
      const old = await cartonOf(tx, item.id);
      if (old) await removeFrom(tx, { parent: old, child: item, data: { case: c.code } }, { ...by, reason: `Came back for service in case ${c.code}` });
      await fit(tx, { parent: carton, child: item, position: "PAIR", data: { case: c.code } }, by);
    }

    const shipmentIdentity = await allocateSerial(tx, { kind: "shipment", code: to === "dealer" ? dealer!.code : OWNER_SHIPMENT_CODE, year });
    const shipment = await createItem(
      tx,
      { kind: "shipment", identity: shipmentIdentity, state: "shipped", dealerId: to === "dealer" ? dealer!.id : null, attrs: { shippedOn, carrier, tracking, case: c.code, to } },
      by,
    );
    const eventId = await appendEvent(tx, {
      ...by,
      type: "case.sent_back",
      subjectKind: "case",
      subjectId: c.id,
      data: { code: c.code, to, sentTo: sentToDesk, carton: cartonIdentity, shipment: shipmentIdentity, shippedOn, carrier, tracking, item: item.identity },
    });
    if (to === "dealer") await tx.insert(shipmentDetails).values({ itemId: shipment.id, dealerId: dealer!.id, shippedOn, carrier, tracking, eventId });
    await fit(tx, { parent: shipment, child: carton, position: "1" }, by);
    await changeState(tx, carton, "shipped", by, { shipment: shipmentIdentity, case: c.code });

    const moved = await moveCase(tx, { caseId: c.id, from: "tested", to: "sent_back", data: { ...ownerMailData("on_its_way", outcome), shipment: shipmentIdentity, carton: cartonIdentity } }, actor);
    await queueOwnerMessage(tx, { case: moved, kind: "on_its_way", eventId: moved.moveEventId, sentTo });
    return { code: c.code, carton, shipment, moveEventId: moved.moveEventId };
  });
}

/** The case's way home as recorded, or null while it has not been sent back. */
export async function caseReturnOf(db: DbOrTx, caseId: string): Promise<CaseReturn | null> {
  const [row] = await db
    .select({ data: events.data })
    .from(events)
    .where(and(eq(events.subjectKind, "case"), eq(events.subjectId, caseId), eq(events.type, "case.sent_back")))
    .orderBy(desc(events.id))
    .limit(1);
  if (!row) return null;
  const d = row.data as Record<string, unknown>;
  const s = (k: string) => (typeof d[k] === "string" ? (d[k] as string) : "");
  return { to: s("to") === "dealer" ? "dealer" : "owner", sentTo: s("sentTo"), carton: s("carton"), shipment: s("shipment"), shippedOn: s("shippedOn"), carrier: s("carrier"), tracking: s("tracking") };
}
