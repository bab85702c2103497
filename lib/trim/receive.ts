/**
 * Goods-in of metal trim parts: a supplier's delivery of machined housings, plinths or bezels for
 * one trim position of a model. The supplier's lot is registered once (or found again when the
 * same lot code arrives a second time) and sits in every trim part that came in it, so a bad lot
 * is traced forward to every speaker and pair holding one of its parts.
 */
import "server-only";
import { and, asc, desc, eq, inArray } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { items, models, modelTrimPositions, type Item } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now as clockNow } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { createItem, fit, itemByIdentity, type Recorder } from "@/lib/genealogy/graph";
import { allocateSerial } from "@/lib/serials/allocator";
import { workshopDay } from "@/lib/workshop-time";
import type { Actor } from "@/lib/vocabulary/actor";
import { KIND_WORD } from "@/lib/vocabulary/item-kinds";
import { SUPPLIER_LOT_POSITION } from "@/lib/vocabulary/positions";
import type { Station } from "@/lib/vocabulary/stations";

/** A delivery is counted in by hand: more than this at once is a slip of the keyboard. */
export const MAX_RECEIVED = 200;
/** Lot codes as suppliers print them: capitals, digits and . - / _ (as component lots). */
export const SUPPLIER_LOT_CODE = /^[A-Z0-9][A-Z0-9._/-]{2,39}$/;

export interface ReceiveTrimInput {
  modelId: string;
  /** A trim position code of the model, e.g. "TOP". */
  position: string;
  supplier: string;
  /** The supplier's lot code as typed: trimmed and upper-cased before it is used. */
  lotCode: string;
  count: number;
}

export interface Received {
  lot: Item;
  /** Whether this delivery registered the lot (false: the lot was received before). */
  newLot: boolean;
  parts: Item[];
}

/** The supplier's lot code as the register keeps it: trimmed, inner spaces gone, capitals. */
export const normaliseLotCode = (raw: string) => raw.trim().replace(/\s+/g, "").toUpperCase();

/**
 * Receives trim parts. Refuses, with the field that needs attention, and writes nothing: an unknown
 * model, a position the model has no trim for, a blank supplier or lot code, a lot code that is
 * not one, a count outside 1…MAX_RECEIVED, and a lot code already used by something that is not a
 * supplier's lot (or by another supplier). Everything in one transaction: the lot (attrs: supplier,
 * received day), N trim parts with serials ("received", model and position), each holding the lot
 * at SLOT, and the "trim.received" event naming them.
 */
export async function receiveTrimParts(db: DbOrTx, input: ReceiveTrimInput, actor: Actor, station: Station = "cabinet"): Promise<Received> {
  const errors: Record<string, string[]> = {};
  const supplier = input.supplier.trim().replace(/\s+/g, " ");
  const lotCode = normaliseLotCode(input.lotCode);
  const position = input.position.trim().toUpperCase();
  if (!supplier) errors.supplier = ["Give the supplier's name, as on the delivery note."];
  else if (supplier.length > 80) errors.supplier = ["At most 80 characters."];
  if (!lotCode) errors.lotCode = ["Give the supplier's lot code, as on the delivery note or the box."];
  else if (!SUPPLIER_LOT_CODE.test(lotCode)) errors.lotCode = ["A lot code is 3 to 40 letters and digits (and . - / _), such as HX-2611-04."];
  if (!Number.isInteger(input.count) || input.count < 1) errors.count = ["Receive at least 1 part."];
  else if (input.count > MAX_RECEIVED) errors.count = [`At most ${MAX_RECEIVED} parts at once.`];
  const [model] = input.modelId ? await db.select().from(models).where(eq(models.id, input.modelId)).limit(1) : [];
  if (!model || !model.active) errors.modelId = ["Choose a model from the list."];
  const positions = model ? await db.select().from(modelTrimPositions).where(eq(modelTrimPositions.modelId, model.id)) : [];
  const pos = positions.find((p) => p.position === position);
  if (model && !positions.length) errors.position = [`The ${model.code} has no trim parts.`];
  else if (model && !pos) errors.position = [`The ${model.code} has no trim position ${position || "(none chosen)"}: its positions are ${positions.map((p) => `${p.label} (${p.position})`).join(", ")}.`];
  if (Object.keys(errors).length) throw new AppError(400, "Nothing was received: some fields need attention.", errors);

  return db.transaction(async (tx) => {
    const at = clockNow();
    const by: Recorder = { actorId: actor.id, station };
    let lot = await itemByIdentity(tx, lotCode);
    const newLot = !lot;
    if (lot && lot.kind !== "supplier_lot") {
      throw new AppError(409, `${lotCode} is already a ${KIND_WORD[lot.kind] ?? lot.kind} in the register: check the supplier's lot code.`, { lotCode: ["Already used by something else."] });
    }
    if (lot && typeof lot.attrs.supplier === "string" && lot.attrs.supplier.toLowerCase() !== supplier.toLowerCase()) {
      throw new AppError(409, `Lot ${lotCode} was received from ${lot.attrs.supplier}, not ${supplier}: check the lot code or the supplier.`, { lotCode: [`A lot of ${lot.attrs.supplier}.`] });
    }
    lot ??= await createItem(tx, { kind: "supplier_lot", identity: lotCode, state: "received", attrs: { supplier, received: workshopDay(at) } }, by);
    const year = at.getUTCFullYear();
    const parts: Item[] = [];
    for (let i = 0; i < input.count; i++) {
      const part = await createItem(
        tx,
        { kind: "trim_part", identity: await allocateSerial(tx, { kind: "trim_part", code: model!.code, year }), state: "received", modelId: model!.id, partType: pos!.position, attrs: { supplier, lot: lotCode } },
        by,
      );
      await fit(tx, { parent: part, child: lot, position: SUPPLIER_LOT_POSITION }, by);
      parts.push(part);
    }
    await appendEvent(tx, {
      actorId: actor.id,
      station,
      type: "trim.received",
      subjectKind: "item",
      subjectId: lot.id,
      data: { lot: lotCode, supplier, model: model!.code, position: pos!.position, count: input.count, parts: parts.map((p) => p.identity), newLot },
    });
    return { lot, newLot, parts };
  });
}

/** A model's trim positions, in the order the model lists them (by code). */
export function trimPositionsOf(db: DbOrTx, modelId: string) {
  return db.select().from(modelTrimPositions).where(eq(modelTrimPositions.modelId, modelId)).orderBy(asc(modelTrimPositions.position));
}

/** Every model's trim positions, for the goods-in form. */
export function allTrimPositions(db: DbOrTx) {
  return db.select().from(modelTrimPositions).orderBy(asc(modelTrimPositions.modelId), asc(modelTrimPositions.position));
}

/** Trim parts not yet fitted (received, on their route or finished), newest first, with their model. */
export function trimPartsInShop(db: DbOrTx, limit = 300) {
  return db
    .select({ id: items.id, identity: items.identity, state: items.state, position: items.partType, createdAt: items.createdAt, attrs: items.attrs, model: models.code, modelId: models.id })
    .from(items)
    .innerJoin(models, eq(models.id, items.modelId))
    .where(and(eq(items.kind, "trim_part"), inArray(items.state, ["received", "in_route", "finished"])))
    .orderBy(desc(items.createdAt))
    .limit(limit);
}
