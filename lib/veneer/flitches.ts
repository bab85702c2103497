import "server-only";
import type { Actor } from "@/lib/vocabulary/actor";
import type { Side } from "@/lib/vocabulary/sides";
import { PAIR_CABINET_POSITION as CABINET_POSITION, facePosition, FLITCH_POSITION } from "@/lib/vocabulary/positions";
import type { DefectKind } from "@/lib/vocabulary/defects";
import { and, asc, eq, inArray, isNull, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { finishes, flitches, items, leafAllocations, links, leafDefects, models, veneerLeaves, type Item, type Orientation } from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { now as clockNow } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { changeState, createItem, fit, itemByIdentity, removeFrom, type Recorder } from "@/lib/genealogy/graph";
import { allocateSerial } from "@/lib/serials/allocator";
import { leafIdentity } from "@/lib/serials/format";
import type { LeafCsvRow } from "./csv";
import { checkRun, planFlitch, planYield, type FlitchPlan, type PlanLeaf, type PlanRun, type PlanSpec } from "./plan";

export const VENEER_STATION = "veneer";

const by = (actor: Actor, reason?: string | null): Recorder => ({ actorId: actor.id, station: VENEER_STATION, reason: reason ?? null });

// ---- intake -------------------------------------------------------------------------------------

export interface FlitchIntake {
  finishId: string;
  logReference: string;
  supplier: string;
  receivedOn: string;
  leafThicknessMm: number;
  leafCount: number;
}

/** Registers a received flitch and its leaves 1…N in slicing order, in one transaction. */
export async function receiveFlitch(db: DbOrTx, input: FlitchIntake, actor: Actor): Promise<Item> {
  const [finish] = await db.select().from(finishes).where(eq(finishes.id, input.finishId)).limit(1);
  if (!finish || !finish.active) throw new AppError(400, "Choose a species from the list.", { finishId: ["Choose a species from the list."] });
  if (finish.kind !== "veneer") throw new AppError(400, `${finish.name} is a lacquer colour, not a veneer species.`, { finishId: ["Choose a veneer species."] });
  const year = Number(input.receivedOn.slice(0, 4));
  return db.transaction(async (tx) => {
    const identity = await allocateSerial(tx, { kind: "flitch", code: finish.code, year });
    const flitch = await createItem(
      tx,
      { kind: "flitch", identity, state: "received", finishId: finish.id, attrs: { species: finish.name, supplier: input.supplier, logReference: input.logReference, leafThicknessMm: input.leafThicknessMm } },
      by(actor),
    );
    const eventId = await appendEvent(tx, {
      actorId: actor.id,
      station: VENEER_STATION,
      type: "flitch.received",
      subjectKind: "item",
      subjectId: flitch.id,
      data: { identity, species: finish.name, ...input },
    });
    await tx.insert(flitches).values({ itemId: flitch.id, ...input, eventId });
    for (let seq = 1; seq <= input.leafCount; seq++) {
      const leaf = await createItem(tx, { kind: "leaf", identity: leafIdentity(identity, seq), state: "available", finishId: finish.id, attrs: { seq } }, by(actor));
      await tx.insert(veneerLeaves).values({ itemId: leaf.id, flitchId: flitch.id, seq });
      // The flitch sits in each of its leaves, so its forward trace reaches the cabinets they face.
      await fit(tx, { parent: leaf, child: flitch, position: FLITCH_POSITION }, by(actor));
    }
    return flitch;
  });
}

// ---- reading ------------------------------------------------------------------------------------

export interface LeafView {
  id: string;
  identity: string;
  seq: number;
  lengthMm: number | null;
  widthMm: number | null;
  usable: boolean;
  state: string;
  defects: { id: number; kind: DefectKind; note: string; positionMm: number | null }[];
  /** The open allocation: facing a cabinet, or held in reserve for a pair. */
  allocation: { role: "face" | "reserve"; pairId: string; pair: string; cabinet: string | null; position: string | null; orientation: Orientation | null } | null;
  /** A face leaf taken off its cabinet (the face re-veneered): its face record stays, and it is spent for good. */
  spent: boolean;
}

export interface FlitchView {
  item: Item;
  intake: typeof flitches.$inferSelect;
  finish: typeof finishes.$inferSelect;
  leaves: LeafView[];
}

export async function flitchView(db: DbOrTx, identity: string): Promise<FlitchView | null> {
  const item = await itemByIdentity(db, identity);
  if (!item || item.kind !== "flitch") return null;
  const [row] = await db.select({ intake: flitches, finish: finishes }).from(flitches).innerJoin(finishes, eq(finishes.id, flitches.finishId)).where(eq(flitches.itemId, item.id)).limit(1);
  if (!row) return null;
  const leafRows = await db
    .select({ leaf: veneerLeaves, identity: items.identity, state: items.state })
    .from(veneerLeaves)
    .innerJoin(items, eq(items.id, veneerLeaves.itemId))
    .where(eq(veneerLeaves.flitchId, item.id))
    .orderBy(asc(veneerLeaves.seq));
  const ids = leafRows.map((r) => r.leaf.itemId);
  const defects = ids.length ? await db.select().from(leafDefects).where(and(inArray(leafDefects.leafId, ids), isNull(leafDefects.clearedEventId))).orderBy(asc(leafDefects.id)) : [];
  const pairItems = sql`(SELECT identity FROM items WHERE id = ${leafAllocations.pairId})`;
  const cabinetItems = sql`(SELECT identity FROM items WHERE id = ${leafAllocations.cabinetId})`;
  const allocations = ids.length
    ? await db
        .select({ a: leafAllocations, pair: sql<string>`${pairItems}`, cabinet: sql<string | null>`${cabinetItems}` })
        .from(leafAllocations)
        .where(inArray(leafAllocations.leafId, ids))
    : [];
  const leaves: LeafView[] = leafRows.map(({ leaf, identity: leafIdentityText, state }) => {
    const mine = allocations.filter((x) => x.a.leafId === leaf.itemId);
    const open = mine.find((x) => x.a.endedAt === null);
    return {
      id: leaf.itemId,
      identity: leafIdentityText,
      seq: leaf.seq,
      lengthMm: leaf.lengthMm,
      widthMm: leaf.widthMm,
      usable: leaf.usable,
      state,
      defects: defects.filter((d) => d.leafId === leaf.itemId).map((d) => ({ id: d.id, kind: d.kind, note: d.note, positionMm: d.positionMm })),
      allocation: open ? { role: open.a.role, pairId: open.a.pairId, pair: open.pair, cabinet: open.cabinet, position: open.a.position, orientation: open.a.orientation } : null,
      spent: state === "scrapped" && mine.some((x) => x.a.role === "face"),
    };
  });
  return { item, intake: row.intake, finish: row.finish, leaves };
}

/** The leaves a plan may still use: measured, usable and given to no pair. */
export function freeLeaves(view: FlitchView): PlanLeaf[] {
  return view.leaves
    .filter((l) => !l.allocation && !l.spent && l.lengthMm !== null && l.widthMm !== null)
    .map((l) => ({ seq: l.seq, lengthMm: l.lengthMm!, widthMm: l.widthMm!, usable: l.usable }));
}

export function specFor(model: { leavesPerFace: number; minLeafLengthMm: number; minLeafWidthMm: number }, reservePerPair: number): PlanSpec {
  return { leavesPerFace: model.leavesPerFace, minLengthMm: model.minLeafLengthMm, minWidthMm: model.minLeafWidthMm, reservePerPair };
}

export interface FlitchPlanView {
  plan: FlitchPlan;
  figures: { pairs: number; leavesUsed: number; faceLeaves: number; areaShare: number };
}

/** The best plan for what is left of a flitch; the yield counts area against the whole flitch. */
export function planView(view: FlitchView, spec: PlanSpec): FlitchPlanView {
  const plan = planFlitch(freeLeaves(view), spec);
  const all = view.leaves.map((l) => ({ seq: l.seq, lengthMm: l.lengthMm ?? 0, widthMm: l.widthMm ?? 0, usable: l.usable }));
  const leftover = view.leaves.map((l) => l.seq).filter((s) => !plan.runs.some((r) => [...r.left, ...r.right, ...r.reserve].includes(s)));
  return { plan: { ...plan, leftover }, figures: { pairs: plan.pairs, ...planYield(all, plan) } };
}

// ---- the leaf table -----------------------------------------------------------------------------

async function leafOf(db: DbOrTx, leafId: string) {
  const [row] = await db
    .select({ leaf: veneerLeaves, item: items })
    .from(veneerLeaves)
    .innerJoin(items, eq(items.id, veneerLeaves.itemId))
    .where(eq(veneerLeaves.itemId, leafId))
    .limit(1);
  if (!row) throw new AppError(404, "That leaf is not in the register.");
  return row;
}

async function faceOf(db: DbOrTx, leafId: string) {
  const [face] = await db
    .select({ cabinet: sql<string>`(SELECT identity FROM items WHERE id = ${leafAllocations.cabinetId})` })
    .from(leafAllocations)
    .where(and(eq(leafAllocations.leafId, leafId), eq(leafAllocations.role, "face")))
    .limit(1);
  return face?.cabinet ?? null;
}

export interface LeafMeasure {
  lengthMm: number | null;
  widthMm: number | null;
  usable: boolean;
}

async function applyMeasure(tx: DbOrTx, leafId: string, next: LeafMeasure, actor: Actor, source: "table" | "csv") {
  const { leaf, item } = await leafOf(tx, leafId);
  const changed = leaf.lengthMm !== next.lengthMm || leaf.widthMm !== next.widthMm || leaf.usable !== next.usable;
  if (!changed) return false;
  const face = await faceOf(tx, leafId);
  if (face) throw new AppError(409, `Leaf ${leaf.seq} already faces ${face}: its record stays as it was when it was laid.`);
  await appendEvent(tx, {
    actorId: actor.id,
    station: VENEER_STATION,
    type: "leaf.measured",
    subjectKind: "item",
    subjectId: leafId,
    data: { identity: item.identity, seq: leaf.seq, source, from: { lengthMm: leaf.lengthMm, widthMm: leaf.widthMm, usable: leaf.usable }, to: next },
  });
  await tx.update(veneerLeaves).set(next).where(eq(veneerLeaves.itemId, leafId));
  return true;
}

/** Records a leaf's size and whether it may face a cabinet; the change is an event with before and after. */
export async function measureLeaf(db: DbOrTx, leafId: string, next: LeafMeasure, actor: Actor): Promise<boolean> {
  return db.transaction((tx) => applyMeasure(tx, leafId, next, actor, "table"));
}

async function insertDefect(tx: DbOrTx, leafId: string, defect: { kind: DefectKind; note: string; positionMm: number | null }, actor: Actor) {
  const { leaf, item } = await leafOf(tx, leafId);
  const eventId = await appendEvent(tx, {
    actorId: actor.id,
    station: VENEER_STATION,
    type: "leaf.defect_noted",
    subjectKind: "item",
    subjectId: leafId,
    data: { identity: item.identity, seq: leaf.seq, ...defect },
  });
  await tx.insert(leafDefects).values({ leafId, ...defect, eventId });
}

/** Notes a defect on a leaf and, unless it is still fit to face a cabinet, marks it unusable. */
export async function noteDefect(
  db: DbOrTx,
  leafId: string,
  defect: { kind: DefectKind; note: string; positionMm: number | null; stillUsable: boolean },
  actor: Actor,
): Promise<void> {
  await db.transaction(async (tx) => {
    const { leaf } = await leafOf(tx, leafId);
    const face = await faceOf(tx, leafId);
    if (face) throw new AppError(409, `Leaf ${leaf.seq} already faces ${face}; record damage on the cabinet instead.`);
    if (defect.positionMm !== null && leaf.lengthMm !== null && defect.positionMm > leaf.lengthMm) {
      throw new AppError(400, `The leaf is ${leaf.lengthMm} mm long; a defect cannot sit at ${defect.positionMm} mm.`, { positionMm: [`At most ${leaf.lengthMm} mm.`] });
    }
    const { stillUsable, ...rest } = defect;
    await insertDefect(tx, leafId, rest, actor);
    if (!stillUsable) await applyMeasure(tx, leafId, { lengthMm: leaf.lengthMm, widthMm: leaf.widthMm, usable: false }, actor, "table");
  });
}

/** Clears a defect noted by mistake (with a reason); the note stays in the history. */
export async function clearDefect(db: DbOrTx, defectId: number, reason: string, actor: Actor): Promise<void> {
  await db.transaction(async (tx) => {
    const [d] = await tx.select().from(leafDefects).where(eq(leafDefects.id, defectId)).limit(1);
    if (!d || d.clearedEventId !== null) throw new AppError(404, "That defect is not open.");
    const { leaf, item } = await leafOf(tx, d.leafId);
    const eventId = await appendEvent(tx, {
      actorId: actor.id,
      station: VENEER_STATION,
      type: "leaf.defect_cleared",
      subjectKind: "item",
      subjectId: d.leafId,
      data: { identity: item.identity, seq: leaf.seq, defectId, kind: d.kind },
      reason,
    });
    await tx.update(leafDefects).set({ clearedEventId: eventId }).where(eq(leafDefects.id, defectId));
  });
}

/** Applies a checked CSV to a flitch's leaves in one transaction: every row or none. */
export async function importLeafRows(db: DbOrTx, flitchId: string, rows: LeafCsvRow[], actor: Actor): Promise<{ changed: number; defects: number }> {
  return db.transaction(async (tx) => {
    const leafRows = await tx.select().from(veneerLeaves).where(eq(veneerLeaves.flitchId, flitchId));
    const bySeq = new Map(leafRows.map((l) => [l.seq, l]));
    let changed = 0;
    let defects = 0;
    for (const row of rows) {
      const leaf = bySeq.get(row.seq);
      if (!leaf) throw new AppError(400, `The flitch has no leaf ${row.seq}.`);
      if (await applyMeasure(tx, leaf.itemId, { lengthMm: row.lengthMm, widthMm: row.widthMm, usable: row.usable }, actor, "csv")) changed++;
      if (row.defect) {
        const [same] = await tx
          .select({ id: leafDefects.id })
          .from(leafDefects)
          .where(and(eq(leafDefects.leafId, leaf.itemId), eq(leafDefects.kind, row.defect.kind), isNull(leafDefects.clearedEventId)))
          .limit(1);
        if (!same) {
          await insertDefect(tx, leaf.itemId, row.defect, actor);
          defects++;
        }
      }
    }
    return { changed, defects };
  });
}

// ---- confirming runs ----------------------------------------------------------------------------

export interface ConfirmedPair {
  pair: Item;
  left: Item;
  right: Item;
  run: PlanRun;
}

/** The leaves of a set of runs another confirmation took first, with the pairs that took them. */
export class LeavesTakenError extends AppError {
  constructor(
    public readonly taken: { seq: number; pair: string }[],
  ) {
    const pairs = [...new Set(taken.map((t) => t.pair))].join(", ");
    super(409, `Leaves ${taken.map((t) => t.seq).join(", ")} were taken a moment ago (for ${pairs}). Nothing was saved; the plan below is drawn again from the leaves still free.`);
    this.name = "LeavesTakenError";
  }
}

/**
 * Turns confirmed runs into pairs, in one transaction: for each run a pair and its left and right
 * cabinets with serials, each face leaf fitted into its cabinet at its face position (the right
 * face's leaves turned over), the reserve held for the pair. Leaves already given to a pair are
 * named in the refusal; the unique indexes on `leaf_allocations` are the last guard.
 */
export async function confirmRuns(
  db: DbOrTx,
  input: { flitchId: string; modelId: string; reservePerPair: number; runs: PlanRun[] },
  actor: Actor,
): Promise<ConfirmedPair[]> {
  const [model] = await db.select().from(models).where(eq(models.id, input.modelId)).limit(1);
  if (!model || !model.active) throw new AppError(400, "Choose a model from the list.");
  if (!input.runs.length) throw new AppError(400, "Tick at least one run to confirm.");
  const spec = specFor(model, input.reservePerPair);
  const seen = new Set<number>();
  for (const run of input.runs) {
    for (const s of [...run.left, ...run.right, ...run.reserve]) {
      if (seen.has(s)) throw new AppError(400, `Leaf ${s} is in two of the chosen runs.`);
      seen.add(s);
    }
  }
  try {
    return await db.transaction(async (tx) => {
      const [flitchItem] = await tx.select().from(items).where(and(eq(items.id, input.flitchId), eq(items.kind, "flitch"))).limit(1);
      if (!flitchItem) throw new AppError(404, "That flitch is not in the register.");
      const view = await flitchView(tx, flitchItem.identity);
      if (!view) throw new AppError(404, "That flitch is not in the register.");
      const wanted = [...seen];
      const taken = view.leaves.filter((l) => wanted.includes(l.seq) && (l.allocation || l.spent)).map((l) => ({ seq: l.seq, pair: l.allocation?.pair ?? "an earlier pair" }));
      if (taken.length) throw new LeavesTakenError(taken);
      const free = freeLeaves(view);
      for (const [i, run] of input.runs.entries()) {
        const problems = checkRun(free, spec, run);
        if (problems.length) throw new AppError(400, `Run ${i + 1} (leaves ${run.left[0]}–${run.reserve.at(-1) ?? run.right.at(-1)}): ${problems.join(" ")}`);
      }
      const leafBySeq = new Map(view.leaves.map((l) => [l.seq, l]));
      const leafItems = new Map((await tx.select().from(items).where(inArray(items.id, view.leaves.map((l) => l.id)))).map((i) => [i.id, i]));
      const year = clockNow().getUTCFullYear();
      const recorder = by(actor);
      const out: ConfirmedPair[] = [];
      for (const run of input.runs) {
        const pair = await createItem(
          tx,
          { kind: "pair", identity: await allocateSerial(tx, { kind: "pair", code: model.code, year }), state: "in_production", modelId: model.id, finishId: view.finish.id, attrs: { flitch: flitchItem.identity } },
          recorder,
        );
        const cabinets: Record<Side, Item> = {} as Record<Side, Item>;
        for (const side of ["L", "R"] as const) {
          const cabinet = await createItem(
            tx,
            { kind: "cabinet", identity: await allocateSerial(tx, { kind: "cabinet", code: model.code, year }), state: "in_progress", modelId: model.id, finishId: view.finish.id, attrs: { side } },
            recorder,
          );
          await fit(tx, { parent: pair, child: cabinet, position: CABINET_POSITION[side] }, recorder);
          cabinets[side] = cabinet;
        }
        const faces: { side: Side; seqs: number[]; orientation: Orientation }[] = [
          { side: "L", seqs: run.left, orientation: "as_cut" },
          { side: "R", seqs: run.right, orientation: "turned" },
        ];
        const allocated = await appendEvent(tx, {
          actorId: actor.id,
          station: VENEER_STATION,
          type: "veneer.run_confirmed",
          subjectKind: "item",
          subjectId: pair.id,
          data: { pair: pair.identity, flitch: flitchItem.identity, left: run.left, right: run.right, reserve: run.reserve, leftCabinet: cabinets.L.identity, rightCabinet: cabinets.R.identity },
        });
        const now = clockNow();
        for (const { side, seqs, orientation } of faces) {
          for (const [i, seq] of seqs.entries()) {
            const leafItem = leafItems.get(leafBySeq.get(seq)!.id)!;
            const position = facePosition(i);
            await fit(tx, { parent: cabinets[side], child: leafItem, position, data: { orientation } }, recorder);
            await tx.insert(leafAllocations).values({ leafId: leafItem.id, pairId: pair.id, role: "face", cabinetId: cabinets[side].id, position, orientation, startedAt: now, eventId: allocated });
            await changeState(tx, leafItem, "used", recorder, { pair: pair.identity });
          }
        }
        for (const seq of run.reserve) {
          const leafItem = leafItems.get(leafBySeq.get(seq)!.id)!;
          await tx.insert(leafAllocations).values({ leafId: leafItem.id, pairId: pair.id, role: "reserve", startedAt: now, eventId: allocated });
          await changeState(tx, leafItem, "reserved", recorder, { pair: pair.identity });
        }
        out.push({ pair, left: cabinets.L, right: cabinets.R, run });
      }
      if (flitchItem.state === "received") await changeState(tx, flitchItem, "in_use", recorder);
      return out;
    });
  } catch (e) {
    if (e instanceof AppError) throw e;
    // Two writers on separate connections: the unique indexes refuse the second; name what it lost.
    if (isConstraintError(e, "UNIQUE")) {
      const view = await flitchView(db, (await db.select({ identity: items.identity }).from(items).where(eq(items.id, input.flitchId)))[0]?.identity ?? "");
      const taken = (view?.leaves ?? []).filter((l) => seen.has(l.seq) && (l.allocation || l.spent)).map((l) => ({ seq: l.seq, pair: l.allocation?.pair ?? "an earlier pair" }));
      throw new LeavesTakenError(taken);
    }
    throw e;
  }
}

// ---- reserves -----------------------------------------------------------------------------------

async function openReserve(tx: DbOrTx, leafId: string) {
  const [a] = await tx
    .select()
    .from(leafAllocations)
    .where(and(eq(leafAllocations.leafId, leafId), eq(leafAllocations.role, "reserve"), isNull(leafAllocations.endedAt)))
    .limit(1);
  if (!a) throw new AppError(409, "That leaf is not held in reserve now.");
  return a;
}

/**
 * Re-veneers one face position of a cabinet from a reserve leaf of the same pair: the damaged
 * leaf comes off (spent for good), the reserve leaf goes on at its place, and the reserve ends.
 */
export async function releaseReserve(
  db: DbOrTx,
  input: { leafId: string; cabinetId: string; position: string; orientation?: Orientation; reason: string },
  actor: Actor,
): Promise<void> {
  await db.transaction(async (tx) => {
    const reserve = await openReserve(tx, input.leafId);
    const [cabinet] = await tx.select().from(items).where(and(eq(items.id, input.cabinetId), eq(items.kind, "cabinet"))).limit(1);
    if (!cabinet) throw new AppError(404, "That cabinet is not in the register.");
    const [face] = await tx
      .select()
      .from(leafAllocations)
      .where(and(eq(leafAllocations.cabinetId, cabinet.id), eq(leafAllocations.role, "face")))
      .limit(1);
    if (!face || face.pairId !== reserve.pairId) throw new AppError(409, `The reserve leaf is held for another pair, not for ${cabinet.identity}'s.`);
    const [pair] = await tx.select().from(items).where(eq(items.id, reserve.pairId)).limit(1);
    const [leaf] = await tx.select().from(items).where(eq(items.id, input.leafId)).limit(1);
    const [old] = await tx
      .select({ item: items })
      .from(links)
      .innerJoin(items, eq(items.id, links.childId))
      .where(and(eq(links.parentId, cabinet.id), eq(links.position, input.position), isNull(links.endedAt), eq(items.kind, "leaf")))
      .limit(1);
    if (!old) throw new AppError(409, `${cabinet.identity} has no leaf at ${input.position} to replace.`);
    const orientation: Orientation = input.orientation ?? (cabinet.attrs.side === "R" ? "turned" : "as_cut");
    const recorder = by(actor, input.reason);
    const eventId = await appendEvent(tx, {
      actorId: actor.id,
      station: VENEER_STATION,
      type: "veneer.reserve_released",
      subjectKind: "item",
      subjectId: input.leafId,
      data: { leaf: leaf!.identity, cabinet: cabinet.identity, pair: pair!.identity, position: input.position, replaces: old.item.identity, orientation },
      reason: input.reason,
    });
    await removeFrom(tx, { parent: cabinet, child: old.item, data: { replacedBy: leaf!.identity } }, { ...recorder, reason: input.reason });
    await changeState(tx, old.item, "scrapped", recorder);
    const now = clockNow();
    await tx.update(leafAllocations).set({ endedAt: now, endEventId: eventId, endReason: "released" }).where(eq(leafAllocations.id, reserve.id));
    await fit(tx, { parent: cabinet, child: leaf!, position: input.position, data: { orientation, repair: true } }, recorder);
    await tx.insert(leafAllocations).values({ leafId: input.leafId, pairId: reserve.pairId, role: "face", cabinetId: cabinet.id, position: input.position, orientation, startedAt: now, eventId });
    await changeState(tx, leaf!, "used", recorder, { pair: pair!.identity, repair: true });
  });
}

/** Gives a reserve leaf back to the flitch's free stock when its pair no longer needs it. */
export async function returnReserve(db: DbOrTx, input: { leafId: string; reason: string }, actor: Actor): Promise<void> {
  await db.transaction(async (tx) => {
    const reserve = await openReserve(tx, input.leafId);
    const [leaf] = await tx.select().from(items).where(eq(items.id, input.leafId)).limit(1);
    const [pair] = await tx.select().from(items).where(eq(items.id, reserve.pairId)).limit(1);
    const eventId = await appendEvent(tx, {
      actorId: actor.id,
      station: VENEER_STATION,
      type: "veneer.reserve_returned",
      subjectKind: "item",
      subjectId: input.leafId,
      data: { leaf: leaf!.identity, pair: pair!.identity },
      reason: input.reason,
    });
    await tx.update(leafAllocations).set({ endedAt: clockNow(), endEventId: eventId, endReason: "returned" }).where(eq(leafAllocations.id, reserve.id));
    await changeState(tx, leaf!, "available", by(actor, input.reason));
  });
}

/** Reserve leaves held for a pair now, with the pair's cabinets and their face positions (for repairs). */
export async function pairVeneer(db: DbOrTx, pairId: string) {
  const rows = await db
    .select({
      a: leafAllocations,
      leaf: items.identity,
      leafState: items.state,
      seq: veneerLeaves.seq,
      cabinet: sql<string | null>`(SELECT identity FROM items WHERE id = ${leafAllocations.cabinetId})`,
    })
    .from(leafAllocations)
    .innerJoin(items, eq(items.id, leafAllocations.leafId))
    .innerJoin(veneerLeaves, eq(veneerLeaves.itemId, leafAllocations.leafId))
    .where(eq(leafAllocations.pairId, pairId))
    .orderBy(asc(veneerLeaves.seq));
  return rows;
}

/** Flitches with their species and how far they have been used, newest first. */
export async function listFlitches(db: DbOrTx) {
  return db.all<{
    id: string;
    identity: string;
    species: string;
    supplier: string;
    logReference: string;
    receivedOn: string;
    leafCount: number;
    measured: number;
    unusable: number;
    free: number;
    pairs: number;
  }>(sql`
    SELECT i.id, i.identity, fn.name AS species, f.supplier, f.log_reference AS logReference, f.received_on AS receivedOn, f.leaf_count AS leafCount,
      (SELECT count(*) FROM veneer_leaves v WHERE v.flitch_id = f.item_id AND v.length_mm IS NOT NULL AND v.width_mm IS NOT NULL) AS measured,
      (SELECT count(*) FROM veneer_leaves v WHERE v.flitch_id = f.item_id AND v.usable = 0) AS unusable,
      (SELECT count(*) FROM veneer_leaves v WHERE v.flitch_id = f.item_id AND v.usable = 1
         AND NOT EXISTS (SELECT 1 FROM leaf_allocations a WHERE a.leaf_id = v.item_id AND (a.ended_at IS NULL OR a.role = 'face'))) AS free,
      (SELECT count(DISTINCT a.pair_id) FROM leaf_allocations a JOIN veneer_leaves v ON v.item_id = a.leaf_id WHERE v.flitch_id = f.item_id) AS pairs
    FROM flitches f JOIN items i ON i.id = f.item_id JOIN finishes fn ON fn.id = f.finish_id
    ORDER BY f.received_on DESC, i.created_at DESC`);
}
