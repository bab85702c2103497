/** A pair (or a lone lacquer cabinet) on its route: where it is, and recording a step with its readings. */
import "server-only";
import { nextNcCode } from "./nc-codes";
import { and, asc, eq, inArray, isNull } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { finishes, items, links, models, nonconformances, processSpecs, routeRecords, routeStarts, type Item, type Nonconformance, type ProcessSpec } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { now as clockNow } from "@/lib/clock";
import { refuseIfHeld } from "@/lib/containments/holds";
import { appendEvent } from "@/lib/events/queries";
import { changeState, itemByIdentity } from "@/lib/genealogy/graph";
import { parseSerial } from "@/lib/serials/format";
import type { Actor } from "@/lib/vocabulary/actor";
import { cabinetsPhrase, checkReadings, checkStep, outOfWindowConfirmation, outOfWindowQuestion, position, type OutOfWindow } from "./rules";
import type { PairPosition, RouteEntry, Side, StepSpec } from "./types";
import { currentSpec } from "./specs";
import { correctedRecords } from "./corrected";
import { checkLots, fitLots } from "./lacquer-lots";

export interface PairRoute {
  pair: Item;
  model: typeof models.$inferSelect;
  finishName: string | null;
  spec: ProcessSpec;
  /** Whether the spec is pinned (the first step is recorded) or would be the current version. */
  started: boolean;
  cabinets: { side: Side; item: Item }[];
  history: RouteEntry[];
  records: (typeof routeRecords.$inferSelect)[];
  ncs: Nonconformance[];
  position: PairPosition;
}

/** Finds the pair a scanned serial belongs to: the pair itself, or one of its cabinets. */
export async function pairOf(db: DbOrTx, text: string): Promise<Item | null> {
  const parsed = parseSerial(text);
  const identity = parsed?.valid ? parsed.canonical : text.trim().toUpperCase();
  const item = await itemByIdentity(db, identity);
  if (!item) return null;
  if (item.kind === "pair") return item;
  if (item.kind === "cabinet") {
    const [holder] = await db
      .select({ pair: items })
      .from(links)
      .innerJoin(items, eq(items.id, links.parentId))
      .where(and(eq(links.childId, item.id), isNull(links.endedAt), eq(items.kind, "pair")))
      .limit(1);
    if (holder) return holder.pair;
    return (await isLoneLacquerCabinet(db, item)) ? item : null;
  }
  return null;
}

/**
 * A lacquer cabinet is made in a batch without a pair and travels the route on its own until
 * assembly pairs it: its route records are kept under its own id, as its own one-cabinet "group".
 */
export async function isLoneLacquerCabinet(db: DbOrTx, item: Item): Promise<boolean> {
  if (item.kind !== "cabinet" || !item.finishId) return false;
  const [finish] = await db.select({ kind: finishes.kind }).from(finishes).where(eq(finishes.id, item.finishId)).limit(1);
  if (finish?.kind !== "lacquer") return false;
  const [held] = await db.select({ id: links.id }).from(links).where(and(eq(links.childId, item.id), isNull(links.endedAt))).limit(1);
  return !held;
}

/** History entries for the cabinets now at each side, from the records and nonconformances. */
function historyFor(records: (typeof routeRecords.$inferSelect)[], ncs: Nonconformance[], cabinets: { side: Side; item: Item }[]): RouteEntry[] {
  const sideOf = new Map(cabinets.map((c) => [c.item.id, c.side]));
  const sides = (list: { id: string }[]) => list.map((c) => sideOf.get(c.id)).filter((s): s is Side => Boolean(s));
  const entries: (RouteEntry & { order: number })[] = [];
  for (const r of records) {
    const s = sides(r.cabinets);
    if (s.length) entries.push({ kind: "step", id: r.id, seq: r.seq, cabinets: s, startedAt: r.startedAt, recordedAt: r.recordedAt, readings: r.readings, outOfWindow: r.outOfWindow, order: r.recordedAt.getTime() });
  }
  for (const n of ncs) {
    entries.push({ kind: "nc_opened", id: n.openedEventId, ncId: n.code, cabinets: sides(n.cabinets), at: n.openedAt, order: n.openedAt.getTime() + 0.5 });
    if (n.dispositionedAt) {
      if (n.disposition === "rework") entries.push({ kind: "rework", id: n.dispositionEventId!, cabinets: sides(n.cabinets), toSeq: n.reworkToSeq!, at: n.dispositionedAt, order: n.dispositionedAt.getTime() });
      entries.push({ kind: "nc_closed", id: n.dispositionEventId!, ncId: n.code, at: n.dispositionedAt, order: n.dispositionedAt.getTime() + 0.5 });
    }
  }
  return entries.sort((a, b) => a.order - b.order || a.id - b.id).map(({ order: _o, ...e }) => e as RouteEntry);
}

export async function pairRoute(db: DbOrTx, pair: Item, at: Date = clockNow()): Promise<PairRoute> {
  const lone = pair.kind === "cabinet" && (await isLoneLacquerCabinet(db, pair));
  if ((pair.kind !== "pair" && !lone) || !pair.modelId) throw new AppError(400, `${pair.identity} is not a pair of a model, nor a lacquer cabinet waiting for one.`);
  const [model] = await db.select().from(models).where(eq(models.id, pair.modelId)).limit(1);
  const [finish] = pair.finishId ? await db.select({ name: finishes.name }).from(finishes).where(eq(finishes.id, pair.finishId)).limit(1) : [];
  const [start] = await db.select().from(routeStarts).where(eq(routeStarts.pairId, pair.id)).limit(1);
  const spec = start ? (await db.select().from(processSpecs).where(eq(processSpecs.id, start.specId)).limit(1))[0]! : await currentSpec(db, pair.modelId);
  if (!spec) throw new AppError(409, `Model ${model!.code} has no route yet: an administrator sets one under Administration → Routes.`);
  const held = await db
    .select({ item: items, position: links.position })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(eq(links.parentId, pair.id), isNull(links.endedAt), inArray(links.position, ["CAB-L", "CAB-R"])));
  const cabinets = lone ? [{ side: "L" as Side, item: pair }] : held.map((h) => ({ side: (h.position === "CAB-L" ? "L" : "R") as Side, item: h.item })).sort((a, b) => a.side.localeCompare(b.side));
  // Each record as its newest correction says (lib/route/corrections.ts): holds and position follow the corrected values and start.
  const records = await correctedRecords(db, pair.id, await db.select().from(routeRecords).where(eq(routeRecords.pairId, pair.id)).orderBy(asc(routeRecords.id)));
  const ncs = await db.select().from(nonconformances).where(eq(nonconformances.pairId, pair.id)).orderBy(asc(nonconformances.openedAt));
  const history = historyFor(records, ncs, cabinets);
  const pos = position(spec.steps, history, cabinets.map((c) => c.side), at);
  return { pair, model: model!, finishName: finish?.name ?? null, spec, started: Boolean(start), cabinets, history, records, ncs, position: pos };
}


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
 * Records a step for one or both cabinets of a pair. Refuses a step out of order or one started
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
    if (!pair) throw new AppError(404, "That pair is not in the register.");
    // An open containment holding the pair, a cabinet of it or a part in it stops the route (and its start).
    await refuseIfHeld(tx, [{ id: pair.id, identity: pair.identity }], "have a route step recorded");
    const route = await pairRoute(tx, pair, at);
    const startedAt = input.startedAt ?? at;
    const missing = input.sides.filter((s) => !route.cabinets.some((c) => c.side === s));
    if (missing.length) throw new AppError(409, `The pair has no ${missing.map((s) => (s === "L" ? "left" : "right")).join(" or ")} cabinet now.`);
    const check = checkStep(route.spec.steps, route.history, { seq: input.seq, cabinets: input.sides, startedAt }, at);
    if (!check.ok) throw new AppError(409, check.reason);
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
    // The last step done by both: the cabinets have finished their route.
    const after = await pairRoute(tx, pair, at);
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
  const who = route.pair.kind === "cabinet" ? "" : `, for ${cabinetsPhrase(sides)}`;
  const nc = route.ncs.find((n) => n.recordId === record.id) ?? null;
  const text = `Recorded step ${record.seq}${step ? `, ${step.name}` : ""}${who}.`;
  return nc
    ? { text: `${text} A reading was out of its window: nonconformance ${nc.code} holds ${route.pair.kind === "cabinet" ? "the cabinet" : "the pair"} until quality dispositions it.`, nc: nc.code }
    : { text, nc: null };
}
