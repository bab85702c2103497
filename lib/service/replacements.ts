/**
 * Replacement parts for a service case: the stock ranked against the survivor in the partner
 * speaker (lib/service/replacement-plan on the lab's own loading of units and boards), and the
 * case's reservations of parts (`case_reservations`), which the schema keeps apart from the lab's
 * matched sets (migration 0033).
 */
import "server-only";
import { and, asc, eq, isNull } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { caseFindings, caseReservations, events, items, links, modelPositions, models, serviceCases, type Item, type Model, type ServiceCase } from "@/db/schema";
import { bandLabel, formatDb, formatLimitDb, thirdOctaveBands } from "@/lib/acoustics";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { refuseIfHeld } from "@/lib/containments/holds";
import { appendEvent } from "@/lib/events/queries";
import { changeState } from "@/lib/genealogy/graph";
import { slotsOf, type Slot } from "@/lib/assembly/slots";
import { boardUnitsOf, crossoverModels, freeBoards } from "@/lib/lab/crossovers";
import { findUnit, freeUnitRows, limitFor, matchUnitsOf, PASSBANDS, unitRowsOf } from "@/lib/lab/units";
import { pairCost, LIMIT_EPSILON_DB, type Unit } from "@/lib/matching";
import { parseSerial } from "@/lib/serials/format";
import type { Actor } from "@/lib/vocabulary/actor";
import { CASE_STATE_WORDS, type CaseState } from "@/lib/vocabulary/case-states";
import { partWord, type PartType } from "@/lib/vocabulary/part-types";
import { PAIR_SPEAKER_POSITION, positionName } from "@/lib/vocabulary/positions";
import { SIDE_WORD, SIDES, type Side } from "@/lib/vocabulary/sides";
import { speakersOf } from "@/lib/genealogy/pair-speakers";
import { caseByCode } from "./queries";
import { planReplacement, type ReplacementPlan } from "./replacement-plan";
import { SERVICE_STATION } from "./states";

/** A case takes parts once it is diagnosed and until it is repaired. */
export const RESERVING_STATES: readonly CaseState[] = ["diagnosed", "waiting_part", "waiting_payment"];

export { SIDE_WORD };
const other = (side: Side): Side => (side === "L" ? "R" : "L");

export { caseByCode };

/** The speaker at a side of a pair now. */
export async function speakerOf(db: DbOrTx, pairId: string, side: Side): Promise<Item | null> {
  return (await speakersOf(db, pairId))[side];
}

/** What sits at a position of a speaker now. */
export async function partAt(db: DbOrTx, speakerId: string, position: string): Promise<Item | null> {
  const [row] = await db
    .select({ item: items })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(eq(links.parentId, speakerId), eq(links.position, position), isNull(links.endedAt)))
    .limit(1);
  return row?.item ?? null;
}

export interface CasePlace {
  case: ServiceCase;
  model: Model;
  pair: Item;
  /** The sides the case brought in: one speaker, or both for a whole pair. */
  caseSides: Side[];
  side: Side;
  slot: Slot;
}

/** The case's speakers' sides: the returned speaker's, or both when the whole pair came back. */
async function sidesOf(db: DbOrTx, c: ServiceCase): Promise<Side[]> {
  if (c.itemId === c.pairId) return [...SIDES];
  const [row] = await db.select({ position: links.position }).from(links).where(and(eq(links.parentId, c.pairId), eq(links.childId, c.itemId))).orderBy(asc(links.id)).limit(1);
  const side = SIDES.find((s) => PAIR_SPEAKER_POSITION[s] === row?.position);
  return side ? [side] : [...SIDES];
}

/**
 * The case, its model and the place (side, position) the desk names, checked: a case that
 * exists, a side of the pair, a position of the model. Bad input is refused with 4xx and words
 * (under `side` or `position`).
 */
export async function casePlace(db: DbOrTx, input: { code: string; side: string; position: string }): Promise<CasePlace> {
  const c = await caseByCode(db, input.code);
  if (!c) throw new AppError(404, `There is no service case ${input.code}.`);
  const [pair] = await db.select().from(items).where(eq(items.id, c.pairId)).limit(1);
  const [model] = pair?.modelId ? await db.select().from(models).where(eq(models.id, pair.modelId)).limit(1) : [];
  if (!pair || !model) throw new AppError(409, `The pair of case ${c.code} has no model on record, so nothing can be matched for it.`);
  const side = input.side.trim().toUpperCase();
  if (side !== "L" && side !== "R") throw new AppError(400, "Choose the side: L for the left speaker or R for the right one.", { side: ["L (left) or R (right)."] });
  const slots = slotsOf(await db.select({ position: modelPositions.position, partType: modelPositions.partType, count: modelPositions.count }).from(modelPositions).where(eq(modelPositions.modelId, model.id)));
  const position = input.position.trim().toUpperCase();
  const slot = slots.find((s) => s.slot === position);
  if (!slot) {
    const known = slots.map((s) => positionName(s.slot)).join(", ");
    throw new AppError(400, `The ${model.code} has no position “${input.position.slice(0, 20)}”; its positions are ${known}.`, { position: [`One of ${slots.map((s) => s.slot).join(", ")}.`] });
  }
  return { case: c, model, pair, caseSides: await sidesOf(db, c), side, slot };
}

export interface ReplacementUnit extends Unit {
  itemId: string;
  identity: string;
  points: number[][];
}

export interface ReplacementView extends ReplacementPlan {
  place: CasePlace;
  /** Where people read it: "left speaker's tweeter (T)". */
  placeWords: string;
  /** What sits there now (the failed part), if anything. */
  current: Item | null;
  survivor: ReplacementUnit & { partType: PartType | null; speaker: string };
  partType: PartType | null;
  bands: ReturnType<typeof thirdOctaveBands>;
  bandLabels: string[];
  limitDb: number;
  fsWeight: number;
  qtsWeight: number;
  /** Every stock unit considered, by id (serial), with its response for the chart. */
  stock: Map<string, ReplacementUnit>;
  notReady: { identity: string; reason: string }[];
}

/**
 * The ranking for a failed position: the survivor is the part now at that position in the
 * partner speaker (the other side); the stock is the lab's free units of the survivor's part
 * type (lib/lab/units `freeUnitRows`: measured, in no open set, held by no case, quarantined by no
 * open containment) or the model's free boards, on the same bands (one-third octaves over the part type's passband, or over the
 * model's response range for boards), with the same Fs/Qts weights and the model's limit.
 */
export async function replacementView(db: DbOrTx, input: { code: string; side: string; position: string; fsWeight?: number; qtsWeight?: number }): Promise<ReplacementView> {
  const place = await casePlace(db, input);
  const { model, pair, side, slot } = place;
  const placeWords = `${SIDE_WORD[side]} speaker's ${positionName(slot.slot)}`;
  const fsWeight = slot.kind === "drive_unit" ? (input.fsWeight ?? 0) : 0;
  const qtsWeight = slot.kind === "drive_unit" ? (input.qtsWeight ?? 0) : 0;
  for (const w of [fsWeight, qtsWeight]) if (!Number.isFinite(w) || w < 0 || w > 10) throw new AppError(400, "A weight is a number from 0 to 10.");

  const speaker = await speakerOf(db, pair.id, side);
  const partner = await speakerOf(db, pair.id, other(side));
  if (!speaker || !partner) throw new AppError(409, `${pair.identity} has no built ${speaker ? SIDE_WORD[other(side)] : SIDE_WORD[side]} speaker in the register, so there is nothing to match against.`);
  const current = await partAt(db, speaker.id, slot.slot);
  const survivorItem = await partAt(db, partner.id, slot.slot);
  if (!survivorItem) throw new AppError(409, `Nothing sits at the ${positionName(slot.slot)} of the ${SIDE_WORD[other(side)]} speaker ${partner.identity} now, so there is no survivor to match.`);

  let bands: ReturnType<typeof thirdOctaveBands>;
  let limitDb: number;
  let survivors: ReplacementUnit[];
  let stock: ReplacementUnit[];
  let notReady: { identity: string; reason: string }[];
  if (slot.kind === "drive_unit") {
    const partType = slot.partType!;
    const pass = PASSBANDS[partType];
    bands = thirdOctaveBands(pass.minHz, pass.maxHz);
    const limit = await limitFor(db, model.id, partType);
    if (!limit) throw new AppError(409, `The ${model.code} has no mismatch limit for ${partWord(partType)}s: ask an administrator to set one.`);
    limitDb = limit.limit;
    const s = matchUnitsOf(await unitRowsOf(db, [{ id: survivorItem.id, identity: survivorItem.identity, state: survivorItem.state, makerSerial: null }], { withPoints: true }), bands);
    survivors = s.units;
    if (!survivors.length) throw new AppError(409, `The survivor ${survivorItem.identity} has no usable response on record (${s.notReady[0]?.reason ?? "not measured"}), so nothing can be ranked against it.`);
    const free = matchUnitsOf(await freeUnitRows(db, partType, { withPoints: true }), bands);
    stock = free.units;
    notReady = free.notReady;
  } else {
    bands = thirdOctaveBands(model.responseMinHz, model.responseMaxHz);
    limitDb = (await crossoverModels(db)).find((m) => m.id === model.id)?.defaultLimitDb ?? model.pairResponseLimitDb;
    const s = await boardUnitsOf(db, [survivorItem], bands);
    survivors = s.units;
    if (!survivors.length) throw new AppError(409, `The survivor ${survivorItem.identity} has no usable response on record (${s.notReady[0]?.reason ?? "not measured"}), so nothing can be ranked against it.`);
    const free = await boardUnitsOf(db, await freeBoards(db, model.id), bands);
    stock = free.units;
    notReady = free.notReady;
  }
  const survivor = survivors[0]!;
  const bandLabels = bands.map((b) => bandLabel(b.nominal));
  const noun = slot.kind === "drive_unit" ? `${partWord(slot.partType!)}s` : "crossover boards";
  const plan = planReplacement(survivor, stock, { limitDb, fsWeight, qtsWeight, bandLabels }, { survivor: survivor.identity, noun });
  return {
    ...plan,
    place,
    placeWords,
    current,
    survivor: { ...survivor, partType: slot.partType, speaker: partner.identity },
    partType: slot.partType,
    bands,
    bandLabels,
    limitDb,
    fsWeight,
    qtsWeight,
    stock: new Map(stock.map((u) => [u.id, u])),
    notReady,
  };
}

// ---- reservations ----------------------------------------------------------------------------

export interface ReservationRow {
  id: number;
  serial: string;
  itemId: string;
  side: Side;
  position: string;
  createdAt: Date;
  endedAt: Date | null;
  endReason: "fitted" | "released" | null;
}

/** A case's reservations, oldest first (open and ended). */
export async function reservationsOfCase(db: DbOrTx, caseId: string): Promise<ReservationRow[]> {
  const rows = await db
    .select({ r: caseReservations, serial: items.identity })
    .from(caseReservations)
    .innerJoin(items, eq(items.id, caseReservations.itemId))
    .where(eq(caseReservations.caseId, caseId))
    .orderBy(asc(caseReservations.id));
  return rows.map(({ r, serial }) => ({ id: r.id, serial, itemId: r.itemId, side: r.side, position: r.position, createdAt: r.createdAt, endedAt: r.endedAt, endReason: r.endReason }));
}

/** Why a typed serial cannot be reserved for the place, or null when it can (it is among the ranked candidates). */
async function whyNot(db: DbOrTx, view: ReplacementView, text: string): Promise<{ item: Item | null; why: string | null }> {
  const what = view.place.slot.kind === "drive_unit" ? partWord(view.partType!) : "crossover board";
  const item = await findUnit(db, text, undefined, { boards: true });
  if (!item) {
    const parsed = parseSerial(text);
    return { item: null, why: parsed && !parsed.valid ? `${text.trim()} is not a valid serial: check the last character.` : `There is no drive unit or crossover board ${text.trim()} in the register.` };
  }
  const id = item.identity;
  if (view.stock.has(id)) {
    const c = view.candidates.find((x) => x.id === id);
    if (c) return { item, why: null };
    const u = view.stock.get(id)!;
    const cost = pairCost(view.survivor, u, { fsWeight: view.fsWeight, qtsWeight: view.qtsWeight });
    return { item, why: `${id} differs from the survivor ${view.survivor.identity} by ${formatDb(cost.maxDiffDb)} at ${view.bandLabels[cost.worstBand] ?? "one band"}, over the ${formatLimitDb(view.limitDb)} limit of the ${view.place.model.code}.` };
  }
  if (view.place.slot.kind === "drive_unit" ? item.kind !== "drive_unit" || item.partType !== view.partType : item.kind !== "crossover") {
    return { item, why: `${id} is not a ${what}; the ${positionName(view.place.slot.slot)} takes a ${what}.` };
  }
  if (item.kind === "crossover" && item.modelId !== view.place.model.id) return { item, why: `${id} is a board for another model, not the ${view.place.model.code}.` };
  const [held] = await db
    .select({ code: serviceCases.code })
    .from(caseReservations)
    .innerJoin(serviceCases, eq(serviceCases.id, caseReservations.caseId))
    .where(and(eq(caseReservations.itemId, item.id), isNull(caseReservations.endedAt)))
    .limit(1);
  if (held) return { item, why: held.code === view.place.case.code ? `${id} is reserved for this case already.` : `${id} is reserved for service case ${held.code}.` };
  const rows = await unitRowsOf(db, [{ id: item.id, identity: id, state: item.state, makerSerial: null }]);
  if (rows[0]?.setCode) return { item, why: `${id} is reserved in the lab's matched set ${rows[0].setCode}.` };
  const stockStates = item.kind === "drive_unit" ? ["measured", "in_stock"] : ["in_stock"];
  if (!stockStates.includes(item.state)) return { item, why: `${id} is not in stock: it is ${item.state.replace(/_/g, " ")}.` };
  const reason = view.notReady.find((n) => n.identity === id)?.reason;
  return { item, why: `${id} cannot be matched: ${reason ?? "no response measured yet"}.` };
}

function checkState(c: ServiceCase) {
  if (!RESERVING_STATES.includes(c.state)) {
    throw new AppError(409, `Case ${c.code} is “${CASE_STATE_WORDS[c.state]}”: parts are reserved once it is diagnosed and until it is repaired.`);
  }
}

async function hasFinding(db: DbOrTx, caseId: string, side: Side, position: string) {
  const [f] = await db.select({ id: caseFindings.id }).from(caseFindings).where(and(eq(caseFindings.caseId, caseId), eq(caseFindings.side, side), eq(caseFindings.position, position))).limit(1);
  return Boolean(f);
}

async function openAt(db: DbOrTx, caseId: string, side: Side, position: string) {
  const [r] = await db
    .select({ serial: items.identity })
    .from(caseReservations)
    .innerJoin(items, eq(items.id, caseReservations.itemId))
    .where(and(eq(caseReservations.caseId, caseId), eq(caseReservations.side, side), eq(caseReservations.position, position), isNull(caseReservations.endedAt)))
    .limit(1);
  return r?.serial ?? null;
}

async function insertReservation(tx: DbOrTx, view: ReplacementView, item: Item, side: Side, actor: Actor, extra: Record<string, unknown>) {
  const at = now();
  const from = item.state;
  const eventId = await appendEvent(tx, {
    actorId: actor.id,
    station: SERVICE_STATION,
    type: "case.part_reserved",
    subjectKind: "case",
    subjectId: view.place.case.id,
    data: { code: view.place.case.code, serial: item.identity, side, position: view.place.slot.slot, survivor: view.survivor.identity, limitDb: view.limitDb, from, ...extra },
    at,
  });
  await tx.insert(caseReservations).values({ caseId: view.place.case.id, itemId: item.id, side, position: view.place.slot.slot, eventId, createdAt: at });
  await changeState(tx, item, "reserved", { actorId: actor.id, station: SERVICE_STATION, at }, { case: view.place.case.code });
}

async function raced<T>(work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (e) {
    if (e instanceof AppError) throw e;
    if (isConstraintError(e, "UNIQUE")) throw new AppError(409, "That part was reserved a moment ago, by the lab or for another case. Nothing was saved; choose again from the list.", { serial: ["Reserved elsewhere a moment ago."] });
    throw e;
  }
}

/**
 * Reserves one stock part for a failed position of the case (the side the desk names), after
 * checking it against the ranking worked out again here: a part that is unknown, not in stock,
 * held by a set or another case, or over the limit against the survivor is refused with the
 * reason under `serial`, and nothing is written.
 */
export async function reserveReplacement(
  db: DbOrTx,
  input: { code: string; side: string; position: string; serial: string; fsWeight?: number; qtsWeight?: number },
  actor: Actor,
): Promise<{ serial: string; side: Side; position: string; cost: number; maxDiffDb: number }> {
  return raced(() =>
    db.transaction(async (tx) => {
      const view = await replacementView(tx, input);
      const { case: c, side, slot } = view.place;
      checkState(c);
      if (!view.place.caseSides.includes(side)) throw new AppError(400, `Case ${c.code} is for the ${SIDE_WORD[view.place.caseSides[0]!]} speaker; a part for the ${SIDE_WORD[side]} one is reserved only as a matched pair for both.`, { side: ["The case's own speaker."] });
      if (!(await hasFinding(tx, c.id, side, slot.slot))) throw new AppError(409, `Record a finding for the ${view.placeWords} before reserving a part for it.`);
      const held = await openAt(tx, c.id, side, slot.slot);
      if (held) throw new AppError(409, `${held} is reserved for the ${view.placeWords} already: release it first to choose another.`, { serial: [`Release ${held} first.`] });
      const text = input.serial.trim();
      if (!text) throw new AppError(400, "Type or scan the serial of the part to reserve.", { serial: ["Type or scan a serial."] });
      // Quarantined stock is not among the candidates; say why, naming the containment.
      const asked = await findUnit(tx, text, undefined, { boards: true });
      if (asked) await refuseIfHeld(tx, [{ id: asked.id, identity: asked.identity }], "be reserved for a repair", "serial");
      const { item, why } = await whyNot(tx, view, text);
      if (why || !item) throw new AppError(400, `Nothing was reserved: ${why}`, { serial: [why!] });
      const cand = view.candidates.find((x) => x.id === item.identity)!;
      await insertReservation(tx, view, item, side, actor, { cost: cand.cost, maxDiffDb: cand.maxDiffDb });
      return { serial: item.identity, side, position: slot.slot, cost: cand.cost, maxDiffDb: cand.maxDiffDb };
    }),
  );
}

/**
 * Reserves a matched pair from stock for both speakers at a position (left part for the left
 * speaker), when no single part matches the survivor. The two are checked against each other and
 * the model's limit here, whatever the browser sent; each must be free stock.
 */
export async function reserveReplacementSet(
  db: DbOrTx,
  input: { code: string; position: string; left: string; right: string; fsWeight?: number; qtsWeight?: number },
  actor: Actor,
): Promise<{ left: string; right: string; cost: number; maxDiffDb: number }> {
  return raced(() =>
    db.transaction(async (tx) => {
      const view = await replacementView(tx, { ...input, side: (await casePlace(tx, { ...input, side: "L" })).caseSides[0]! });
      const { case: c, slot } = view.place;
      checkState(c);
      if (!(await Promise.all(view.place.caseSides.map((s) => hasFinding(tx, c.id, s, slot.slot)))).some(Boolean)) throw new AppError(409, `Record a finding at the ${positionName(slot.slot)} before reserving parts for it.`);
      for (const s of SIDES) {
        const held = await openAt(tx, c.id, s, slot.slot);
        if (held) throw new AppError(409, `${held} is reserved for the ${SIDE_WORD[s]} speaker's ${positionName(slot.slot)} already: release it first.`);
      }
      const picked: Record<Side, ReplacementUnit> = {} as Record<Side, ReplacementUnit>;
      const errors: Record<string, string[]> = {};
      for (const [s, text] of [["L", input.left], ["R", input.right]] as const) {
        const key = s === "L" ? "left" : "right";
        const item = text.trim() ? await findUnit(tx, text.trim(), undefined, { boards: true }) : null;
        if (item) await refuseIfHeld(tx, [{ id: item.id, identity: item.identity }], "be reserved for a repair", key);
        const unit = item ? view.stock.get(item.identity) : undefined;
        if (!unit) {
          const { why } = item ? await whyNot(tx, view, text) : { why: `There is no drive unit or crossover board ${text.trim() || "(empty)"} in the register.` };
          // A unit over the limit of the survivor may still pair with another: only its stock matters here.
          errors[key] = [why && !/over the .* limit/.test(why) ? why : `${text.trim()} is not free stock for this position.`];
        } else picked[s] = unit;
      }
      if (!errors.left && !errors.right && picked.L.itemId === picked.R.itemId) errors.right = ["Choose two different parts."];
      if (Object.keys(errors).length) throw new AppError(400, `Nothing was reserved: ${Object.values(errors)[0]![0]}`, errors);
      const cost = pairCost(picked.L, picked.R, { fsWeight: view.fsWeight, qtsWeight: view.qtsWeight });
      if (cost.maxDiffDb > view.limitDb + LIMIT_EPSILON_DB) {
        const why = `${picked.L.identity} and ${picked.R.identity} differ by ${formatDb(cost.maxDiffDb)} at ${view.bandLabels[cost.worstBand] ?? "one band"}, over the ${formatLimitDb(view.limitDb)} limit.`;
        throw new AppError(400, `Nothing was reserved: ${why}`, { right: [why] });
      }
      for (const s of SIDES) {
        const [item] = await tx.select().from(items).where(eq(items.id, picked[s].itemId)).limit(1);
        await insertReservation(tx, view, item!, s, actor, { pairWith: picked[other(s)].identity, cost: cost.cost, maxDiffDb: cost.maxDiffDb });
      }
      return { left: picked.L.identity, right: picked.R.identity, cost: cost.cost, maxDiffDb: cost.maxDiffDb };
    }),
  );
}

/** Releases every open reservation of a case (a case cancelled gives its parts back), in the caller's transaction. */
export async function releaseAllOfCase(db: DbOrTx, caseId: string, actor: Actor): Promise<string[]> {
  const [c] = await db.select().from(serviceCases).where(eq(serviceCases.id, caseId)).limit(1);
  if (!c) return [];
  const open = (await reservationsOfCase(db, caseId)).filter((r) => r.endedAt === null);
  for (const r of open) await releaseReservation(db, { code: c.code, serial: r.serial, reason: "the case is cancelled" }, actor);
  return open.map((r) => r.serial);
}

/** Ends an open reservation of the case as released: the part goes back to the state it had. */
export async function releaseReservation(db: DbOrTx, input: { code: string; serial: string; reason?: string | null }, actor: Actor): Promise<{ serial: string }> {
  const work = async (tx: DbOrTx) => {
    const c = await caseByCode(tx, input.code);
    if (!c) throw new AppError(404, `There is no service case ${input.code}.`);
    const [row] = await tx
      .select({ r: caseReservations, item: items })
      .from(caseReservations)
      .innerJoin(items, eq(items.id, caseReservations.itemId))
      .where(and(eq(caseReservations.caseId, c.id), eq(items.identity, input.serial.trim().toUpperCase()), isNull(caseReservations.endedAt)))
      .limit(1);
    if (!row) throw new AppError(409, `${input.serial.trim()} is not reserved for case ${c.code} now.`, { serial: ["Not reserved for this case."] });
    // Back to the state it had when reserved ("measured" or "in stock"), as its reservation event says.
    const [reserved] = await tx.select({ data: events.data }).from(events).where(eq(events.id, row.r.eventId)).limit(1);
    const at = now();
    const eventId = await appendEvent(tx, {
      actorId: actor.id,
      station: SERVICE_STATION,
      type: "case.reservation_released",
      subjectKind: "case",
      subjectId: c.id,
      data: { code: c.code, serial: row.item.identity, side: row.r.side, position: row.r.position },
      reason: input.reason?.trim() || null,
      at,
    });
    const ended = await tx
      .update(caseReservations)
      .set({ endedAt: at, endEventId: eventId, endReason: "released" })
      .where(and(eq(caseReservations.id, row.r.id), isNull(caseReservations.endedAt)))
      .returning({ id: caseReservations.id });
    if (ended.length !== 1) throw new AppError(409, `${row.item.identity}'s reservation ended a moment ago. Nothing was changed.`);
    const from = (reserved?.data as { from?: unknown } | undefined)?.from;
    await changeState(tx, row.item, from === "measured" || from === "in_stock" ? from : "in_stock", { actorId: actor.id, station: SERVICE_STATION, at }, { case: c.code, released: true });
    return { serial: row.item.identity };
  };
  return "rollback" in db ? work(db) : db.transaction(work);
}
