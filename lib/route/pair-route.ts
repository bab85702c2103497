/**
 * The one route engine for every routed item (a cabinet pair, a lone lacquer cabinet, a metal trim
 * part): where it is on its route, and recording a step with its readings. What the records hang
 * on and who its members are is resolved once, in lib/route/routed-group.ts; nothing here is
 * written per kind.
 */
import "server-only";
import { nextNcCode } from "./nc-codes";
import { asc, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { finishes, items, models, nonconformances, processSpecs, routeRecords, routeStarts, type Item, type Nonconformance, type ProcessSpec } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { now as clockNow } from "@/lib/clock";
import { refuseIfHeld } from "@/lib/containments/holds";
import { appendEvent } from "@/lib/events/queries";
import { changeState } from "@/lib/genealogy/graph";
import type { Actor } from "@/lib/vocabulary/actor";
import { ROUTE_KIND_LABEL } from "@/lib/vocabulary/route-kinds";
import { HOLDER_WORD, membersPhrase } from "./group-words";
import { checkReadings, checkStep, outOfWindowConfirmation, outOfWindowQuestion, type OutOfWindow } from "./rules";
import { routeState } from "./route-state";
import { groupWords, isLoneLacquerCabinet, routedGroup, routedItemOf, type RoutedGroup } from "./routed-group";
import type { PairPosition, RouteEntry, Side, StepSpec } from "./types";
import { currentSpec } from "./specs";
import { correctedRecords } from "./corrected";
import { checkLots, fitLots } from "./lacquer-lots";

export { isLoneLacquerCabinet, routedItemOf };

export interface ItemRoute {
  /** The routed item the records hang on: a pair, a lone lacquer cabinet or a trim part. */
  pair: Item;
  group: RoutedGroup;
  model: typeof models.$inferSelect;
  finishName: string | null;
  spec: ProcessSpec;
  /** Whether the spec is pinned (the first step is recorded) or would be the current version. */
  started: boolean;
  /** The group's members by side: a pair's cabinets, or the one lone item as "L". */
  cabinets: { side: Side; item: Item }[];
  history: RouteEntry[];
  records: (typeof routeRecords.$inferSelect)[];
  ncs: Nonconformance[];
  position: PairPosition;
}
/** The older name, kept for the callers in other areas. */
export type PairRoute = ItemRoute;

/** Finds the routed item a scanned serial belongs to (see routedItemOf); the older name. */
export const pairOf = routedItemOf;

/** Where a routed item is on its route (the route version it started under, or the newest of its kind). */
export async function routeOf(db: DbOrTx, routed: Item, at: Date = clockNow()): Promise<ItemRoute> {
  const group = await routedGroup(db, routed);
  if (!group) throw new AppError(400, `${routed.identity} is not a pair, a lacquer cabinet waiting for one, nor a trim part of a model.`);
  const modelId = routed.modelId!;
  const [model] = await db.select().from(models).where(eq(models.id, modelId)).limit(1);
  const [finish] = routed.finishId ? await db.select({ name: finishes.name }).from(finishes).where(eq(finishes.id, routed.finishId)).limit(1) : [];
  const [start] = await db.select().from(routeStarts).where(eq(routeStarts.pairId, routed.id)).limit(1);
  const spec = start ? (await db.select().from(processSpecs).where(eq(processSpecs.id, start.specId)).limit(1))[0]! : await currentSpec(db, modelId, group.routeKind);
  if (!spec) throw new AppError(409, `Model ${model!.code} has no ${ROUTE_KIND_LABEL[group.routeKind].toLowerCase()} yet: an administrator sets one under Administration → Routes.`);
  // Each record as its newest correction says (lib/route/corrections.ts): holds and position follow the corrected values and start.
  const records = await correctedRecords(db, routed.id, await db.select().from(routeRecords).where(eq(routeRecords.pairId, routed.id)).orderBy(asc(routeRecords.id)));
  const ncs = await db.select().from(nonconformances).where(eq(nonconformances.pairId, routed.id)).orderBy(asc(nonconformances.openedAt));
  const cabinets = group.members;
  const { history, position: pos } = routeState(spec.steps, records, ncs, cabinets, at);
  return { pair: routed, group, model: model!, finishName: finish?.name ?? null, spec, started: Boolean(start), cabinets, history, records, ncs, position: pos };
}

/** The older name of routeOf, kept for the callers in other areas. */
export const pairRoute = routeOf;

/**
 * Readings out of their window that the person recording has not confirmed: nothing is written.
 * `confirmation` is what to send back (as `confirmOutOfWindow`) to record them and open a
 * nonconformance; the message is the question to ask.
 */
export class OutOfWindowUnconfirmed extends AppError {
  constructor(
    public readonly outOfWindow: OutOfWindow[],
    public readonly confirmation: string,
  ) {
    super(409, outOfWindowQuestion(outOfWindow), Object.fromEntries(outOfWindow.map((o) => [o.key, [`Out of its window (${o.window}).`]])));
    this.name = "OutOfWindowUnconfirmed";
  }
}

/**
 * Records a step for a routed item: one or both cabinets of a pair, a lone cabinet or a trim part
 * (`pairId` is the routed item's id, whatever its kind). Refuses a step out of order or one started
 * before a hold releases (with the time it becomes allowed), and a reading that is not a number.
 * A reading out of its window is recorded only when `confirmOutOfWindow` names it and its value
 * (`outOfWindowConfirmation`; otherwise OutOfWindowUnconfirmed asks, and nothing is written); it
 * then opens a nonconformance that holds the pair.
 */
export async function recordStep(
  db: DbOrTx,
  input: { pairId: string; seq: number; sides: Side[]; startedAt?: Date; readings: Record<string, string | boolean | undefined>; confirmOutOfWindow?: string | null },
  actor: Actor,
): Promise<{ recordId: number; nc: string | null }> {
  return db.transaction(async (tx) => {
    const at = clockNow();
    const [pair] = await tx.select().from(items).where(eq(items.id, input.pairId)).limit(1);
    if (!pair) throw new AppError(404, "That pair or part is not in the register.");
    // An open containment holding the pair, a cabinet of it or a part in it stops the route (and its start).
    await refuseIfHeld(tx, [{ id: pair.id, identity: pair.identity }], "have a route step recorded");
    const route = await routeOf(tx, pair, at);
    const kind = route.group.kind;
    const startedAt = input.startedAt ?? at;
    const missing = input.sides.filter((s) => !route.cabinets.some((c) => c.side === s));
    if (missing.length) throw new AppError(409, kind === "pair" ? `The pair has no ${missing.map((s) => (s === "L" ? "left" : "right")).join(" or ")} cabinet now.` : `Record the step for ${HOLDER_WORD[kind]} itself.`);
    const check = checkStep(route.spec.steps, route.history, { seq: input.seq, cabinets: input.sides, startedAt }, at);
    if (!check.ok) throw new AppError(409, groupWords(kind, check.reason));
    const step = route.spec.steps.find((s) => s.seq === input.seq)!;
    // Where: the station the route names for this step, never what the request says.
    const station = step.station;
    const readings = checkReadings(step, input.readings);
    if (!readings.ok) throw new AppError(400, "Some readings need attention.", readings.fieldErrors);
    const confirmation = outOfWindowConfirmation(readings.outOfWindow);
    if (readings.outOfWindow.length && input.confirmOutOfWindow !== confirmation) throw new OutOfWindowUnconfirmed(readings.outOfWindow, confirmation);
    await checkLots(tx, step, readings.values);
    if (!route.started) {
      const eventId = await appendEvent(tx, { actorId: actor.id, station, type: "route.started", subjectKind: "item", subjectId: pair.id, data: { identity: pair.identity, specVersion: route.spec.version } });
      await tx.insert(routeStarts).values({ pairId: pair.id, specId: route.spec.id, eventId });
    }
    const cabinets = route.cabinets.filter((c) => input.sides.includes(c.side));
    const out = readings.outOfWindow;
    let firstEvent = 0;
    for (const c of cabinets) {
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station,
        type: "route.step_recorded",
        subjectKind: "item",
        subjectId: c.item.id,
        data: { identity: c.item.identity, pair: pair.identity, seq: step.seq, step: step.name, side: c.side, readings: readings.values, outOfWindow: out.map((o) => o.key), startedAt: startedAt.toISOString() },
      });
      firstEvent ||= eventId;
    }
    const [record] = await tx
      .insert(routeRecords)
      .values({ pairId: pair.id, specId: route.spec.id, seq: step.seq, cabinets: cabinets.map((c) => ({ id: c.item.id, side: c.side })), startedAt, recordedAt: at, readings: readings.values, outOfWindow: out.length > 0, eventId: firstEvent })
      .returning({ id: routeRecords.id });
    // A lot reading (the coat's lacquer lot) goes into the cabinets as a traceable supplier lot.
    await fitLots(tx, step, readings.values, cabinets.map((c) => c.item), { actorId: actor.id, station });
    let nc: string | null = null;
    if (out.length) {
      nc = await nextNcCode(tx, at);
      const finding = out.map((o) => `${o.label} ${typeof o.value === "boolean" ? (o.value ? "pass" : "not passed") : `${o.value}${unitOf(step, o.key)}`} (window ${o.window})`).join("; ");
      const id = newId();
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station,
        type: "nc.opened",
        subjectKind: "item",
        subjectId: pair.id,
        data: { identity: pair.identity, code: nc, step: step.name, seq: step.seq, finding, sides: input.sides },
      });
      await tx.insert(nonconformances).values({ id, code: nc, pairId: pair.id, recordId: record!.id, cabinets: cabinets.map((c) => ({ id: c.item.id, side: c.side })), seq: step.seq, finding, openedAt: at, openedEventId: eventId });
    }
    // The last step done by every member: the cabinets (or the part) have finished their route.
    const after = await routeOf(tx, pair, at);
    for (const c of after.position.cabinets) {
      const cab = route.cabinets.find((x) => x.side === c.side)!.item;
      const state = c.next === null ? "finished" : "in_route";
      if (cab.state !== state && cab.state !== "scrapped") await changeState(tx, cab, state, { actorId: actor.id, station });
    }
    return { recordId: record!.id, nc };
  });
}

function unitOf(step: StepSpec, key: string) {
  const u = step.readings.find((r) => r.key === key)?.unit;
  return u ? ` ${u}` : "";
}


/**
 * What a page says after a step is recorded, from the record itself: "Recorded step 3, Brace
 * fitting, for the left and right cabinets." and the nonconformance it opened. Null for a record
 * that is not this pair's.
 */
export function recordedNotice(route: PairRoute, recordId: number): { text: string; nc: string | null } | null {
  const record = route.records.find((r) => r.id === recordId);
  if (!record) return null;
  const step = route.spec.steps.find((s) => s.seq === record.seq);
  const sides = record.cabinets.map((c) => c.side);
  const kind = route.group.kind;
  const who = kind === "pair" ? `, for ${membersPhrase(kind, sides)}` : "";
  const nc = route.ncs.find((n) => n.recordId === record.id) ?? null;
  const text = `Recorded step ${record.seq}${step ? `, ${step.name}` : ""}${who}.`;
  return nc
    ? { text: `${text} A reading was out of its window: nonconformance ${nc.code} holds ${HOLDER_WORD[kind]} until quality dispositions it.`, nc: nc.code }
    : { text, nc: null };
}
