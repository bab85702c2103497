import "server-only";
import { and, asc, desc, eq, inArray, isNull, like, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { finishes, items, links, models, nonconformances, processSpecs, routeRecords, routeStarts, type Item, type Nonconformance, type ProcessSpec } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { now as clockNow } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { changeState, fit, itemByIdentity, removeFrom, type Recorder } from "@/lib/genealogy/graph";
import { parseSerial } from "@/lib/serials/format";
import { defaultRoute } from "./default-spec";
import { checkReadings, checkStep, position } from "./rules";
import type { PairPosition, RouteEntry, Side, StepSpec } from "./types";

export const CAB_POSITION: Record<Side, string> = { L: "CAB-L", R: "CAB-R" };

export interface RouteActor {
  id: string;
}

// ---- specs --------------------------------------------------------------------------------------

/** The newest version of a model's route. */
export async function currentSpec(db: DbOrTx, modelId: string): Promise<ProcessSpec | null> {
  const [row] = await db.select().from(processSpecs).where(eq(processSpecs.modelId, modelId)).orderBy(desc(processSpecs.version)).limit(1);
  return row ?? null;
}

export async function specVersions(db: DbOrTx, modelId: string) {
  return db.select().from(processSpecs).where(eq(processSpecs.modelId, modelId)).orderBy(desc(processSpecs.version));
}

/** Gives every model without a route the default one as version 1 (the demo seed and new models). */
export async function ensureDefaultSpecs(tx: DbOrTx, actorId: string | null = null, station = "seed"): Promise<number> {
  const all = await tx.select({ id: models.id, code: models.code }).from(models);
  let made = 0;
  for (const m of all) {
    if (await currentSpec(tx, m.id)) continue;
    const id = newId();
    const eventId = await appendEvent(tx, { actorId, station, type: "spec.created", subjectKind: "model", subjectId: m.id, data: { model: m.code, version: 1, steps: defaultRoute().length } });
    await tx.insert(processSpecs).values({ id, modelId: m.id, version: 1, steps: defaultRoute(), note: "The workshop's usual route.", createdBy: actorId, eventId });
    made++;
  }
  return made;
}

/** An edit of a route is a new version; pairs already started keep theirs. */
export async function createSpecVersion(db: DbOrTx, input: { modelId: string; steps: StepSpec[]; note: string }, actor: RouteActor): Promise<ProcessSpec> {
  if (!input.steps.length) throw new AppError(400, "A route needs at least one step.");
  input.steps.forEach((s, i) => {
    if (s.seq !== i + 1) throw new AppError(400, `Step ${i + 1} is numbered ${s.seq}: number the steps 1, 2, 3… in order.`);
  });
  return db.transaction(async (tx) => {
    const latest = await currentSpec(tx, input.modelId);
    const version = (latest?.version ?? 0) + 1;
    const id = newId();
    const [model] = await tx.select({ code: models.code }).from(models).where(eq(models.id, input.modelId)).limit(1);
    const eventId = await appendEvent(tx, { actorId: actor.id, station: "admin", type: "spec.created", subjectKind: "model", subjectId: input.modelId, data: { model: model?.code, code: model?.code, version, steps: input.steps.length, note: input.note } });
    const [row] = await tx.insert(processSpecs).values({ id, modelId: input.modelId, version, steps: input.steps, note: input.note, createdBy: actor.id, eventId }).returning();
    return row!;
  });
}

// ---- a pair on its route ------------------------------------------------------------------------

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
  const records = await db.select().from(routeRecords).where(eq(routeRecords.pairId, pair.id)).orderBy(asc(routeRecords.id));
  const ncs = await db.select().from(nonconformances).where(eq(nonconformances.pairId, pair.id)).orderBy(asc(nonconformances.openedAt));
  const history = historyFor(records, ncs, cabinets);
  const pos = position(spec.steps, history, cabinets.map((c) => c.side), at);
  return { pair, model: model!, finishName: finish?.name ?? null, spec, started: Boolean(start), cabinets, history, records, ncs, position: pos };
}

async function nextNcCode(tx: DbOrTx, at: Date) {
  const prefix = `NC-${at.toISOString().slice(2, 4)}${at.toISOString().slice(5, 7)}-`;
  const [row] = await tx.select({ n: sql<number>`count(*)` }).from(nonconformances).where(like(nonconformances.code, `${prefix}%`));
  return `${prefix}${String(Number(row?.n ?? 0) + 1).padStart(3, "0")}`;
}

/**
 * Records a step for one or both cabinets of a pair. Refuses a step out of order or one started
 * before a hold releases (with the time it becomes allowed), and a reading that is not a number.
 * A reading out of its window is recorded, and opens a nonconformance that holds the pair.
 */
export async function recordStep(
  db: DbOrTx,
  input: { pairId: string; seq: number; sides: Side[]; startedAt?: Date; readings: Record<string, string | boolean | undefined>; station: string },
  actor: RouteActor,
): Promise<{ recordId: number; nc: string | null }> {
  return db.transaction(async (tx) => {
    const at = clockNow();
    const [pair] = await tx.select().from(items).where(eq(items.id, input.pairId)).limit(1);
    if (!pair) throw new AppError(404, "That pair is not in the register.");
    const route = await pairRoute(tx, pair, at);
    const startedAt = input.startedAt ?? at;
    const missing = input.sides.filter((s) => !route.cabinets.some((c) => c.side === s));
    if (missing.length) throw new AppError(409, `The pair has no ${missing.map((s) => (s === "L" ? "left" : "right")).join(" or ")} cabinet now.`);
    const check = checkStep(route.spec.steps, route.history, { seq: input.seq, cabinets: input.sides, startedAt }, at);
    if (!check.ok) throw new AppError(409, check.reason);
    const step = route.spec.steps.find((s) => s.seq === input.seq)!;
    const readings = checkReadings(step, input.readings);
    if (!readings.ok) throw new AppError(400, "Some readings need attention.", readings.fieldErrors);
    if (!route.started) {
      const eventId = await appendEvent(tx, { actorId: actor.id, station: input.station, type: "route.started", subjectKind: "item", subjectId: pair.id, data: { identity: pair.identity, specVersion: route.spec.version } });
      await tx.insert(routeStarts).values({ pairId: pair.id, specId: route.spec.id, eventId });
    }
    const cabinets = route.cabinets.filter((c) => input.sides.includes(c.side));
    const out = readings.outOfWindow;
    let firstEvent = 0;
    for (const c of cabinets) {
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station: input.station,
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
    let nc: string | null = null;
    if (out.length) {
      nc = await nextNcCode(tx, at);
      const finding = out.map((o) => `${o.label} ${typeof o.value === "boolean" ? (o.value ? "pass" : "not passed") : `${o.value}${unitOf(step, o.key)}`} (window ${o.window})`).join("; ");
      const id = newId();
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station: input.station,
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
      if (cab.state !== state && cab.state !== "scrapped") await changeState(tx, cab, state, { actorId: actor.id, station: input.station });
    }
    return { recordId: record!.id, nc };
  });
}

function unitOf(step: StepSpec, key: string) {
  const u = step.readings.find((r) => r.key === key)?.unit;
  return u ? ` ${u}` : "";
}

/** Quality's decision on a nonconformance, once: rework to a named step, use as is, or scrap one cabinet. */
export async function dispositionNc(
  db: DbOrTx,
  input: { ncId: string; disposition: "rework" | "use_as_is" | "scrap"; reworkToSeq?: number | null; scrapSide?: Side | null; reason: string },
  actor: RouteActor,
): Promise<void> {
  await db.transaction(async (tx) => {
    const at = clockNow();
    const [nc] = await tx.select().from(nonconformances).where(eq(nonconformances.id, input.ncId)).limit(1);
    if (!nc) throw new AppError(404, "That nonconformance is not in the register.");
    if (nc.disposition) throw new AppError(409, `${nc.code} was already dispositioned (${nc.disposition.replace(/_/g, " ")}).`);
    const [pair] = await tx.select().from(items).where(eq(items.id, nc.pairId)).limit(1);
    const route = await pairRoute(tx, pair!, at);
    let reworkToSeq: number | null = null;
    let scrapCabinet: Item | null = null;
    // Seq 0 is the final pair test: rework means adjust and test again; use as is accepts the deviation.
    const finalTest = nc.seq === 0;
    if (finalTest && input.disposition === "scrap") throw new AppError(400, "A final-test nonconformance is reworked (adjusted and tested again) or used as is.", { disposition: ["Choose rework or use as is."] });
    if (finalTest && input.disposition === "rework") reworkToSeq = 0;
    else if (input.disposition === "rework") {
      const step = route.spec.steps.find((s) => s.seq === input.reworkToSeq);
      if (!step) throw new AppError(400, "Choose the step to go back to.", { reworkToSeq: ["Choose a step of the route."] });
      if (step.seq > nc.seq) throw new AppError(400, `Rework goes back: choose step ${nc.seq} or an earlier one.`, { reworkToSeq: [`Step ${nc.seq} or earlier.`] });
      reworkToSeq = step.seq;
    }
    if (input.disposition === "scrap") {
      const c = route.cabinets.find((x) => x.side === input.scrapSide);
      if (!c) throw new AppError(400, "Choose the cabinet to scrap.", { scrapSide: ["Choose left or right."] });
      scrapCabinet = c.item;
    }
    const eventId = await appendEvent(tx, {
      actorId: actor.id,
      station: "quality",
      type: "nc.dispositioned",
      subjectKind: "item",
      subjectId: pair!.id,
      data: { identity: pair!.identity, code: nc.code, disposition: input.disposition, reworkToSeq, scrapped: scrapCabinet?.identity ?? null },
      reason: input.reason,
    });
    await tx
      .update(nonconformances)
      .set({ disposition: input.disposition, reworkToSeq, scrapCabinetId: scrapCabinet?.id ?? null, reason: input.reason, approvedBy: actor.id, dispositionedAt: at, dispositionEventId: eventId })
      .where(eq(nonconformances.id, nc.id));
    if (finalTest) {
      await changeState(tx, pair!, input.disposition === "use_as_is" ? "ready_to_pack" : "awaiting_test", { actorId: actor.id, station: "quality", reason: input.reason }, { nc: nc.code });
    }
    if (scrapCabinet && pair!.kind === "cabinet") {
      // A lone lacquer cabinet: nothing to break apart.
      await changeState(tx, scrapCabinet, "scrapped", { actorId: actor.id, station: "quality", reason: input.reason }, { nc: nc.code });
    } else if (scrapCabinet) {
      const by: Recorder = { actorId: actor.id, station: "quality", reason: input.reason };
      await removeFrom(tx, { parent: pair!, child: scrapCabinet, data: { nc: nc.code } }, { ...by, reason: `scrapped under ${nc.code}: ${input.reason}` });
      await changeState(tx, scrapCabinet, "scrapped", by, { nc: nc.code });
      await changeState(tx, pair!, "unpartnered", by, { scrapped: scrapCabinet.identity });
    }
  });
}

/**
 * Gives a pair that lost a cabinet a new partner: quality's sign-off, with its reason. The new
 * cabinet is of the same model and finish and in no pair; it starts the route from the beginning.
 */
export async function repartner(db: DbOrTx, input: { pairId: string; cabinet: string; reason: string }, actor: RouteActor): Promise<Item> {
  return db.transaction(async (tx) => {
    const [pair] = await tx.select().from(items).where(eq(items.id, input.pairId)).limit(1);
    if (!pair || pair.kind !== "pair") throw new AppError(404, "That pair is not in the register.");
    const route = await pairRoute(tx, pair);
    const empty = (["L", "R"] as Side[]).find((s) => !route.cabinets.some((c) => c.side === s));
    if (!empty) throw new AppError(409, `${pair.identity} has both its cabinets.`);
    const parsed = parseSerial(input.cabinet);
    const cabinet = await itemByIdentity(tx, parsed?.valid ? parsed.canonical : input.cabinet.trim().toUpperCase());
    if (!cabinet || cabinet.kind !== "cabinet") throw new AppError(404, `${input.cabinet} is not a cabinet in the register.`, { cabinet: ["Scan or type a cabinet serial."] });
    if (cabinet.state === "scrapped") throw new AppError(409, `${cabinet.identity} is scrapped.`, { cabinet: ["A scrapped cabinet cannot be a partner."] });
    if (cabinet.modelId !== pair.modelId || cabinet.finishId !== pair.finishId) throw new AppError(409, `${cabinet.identity} is not of the pair's model and finish.`, { cabinet: ["Same model and finish only."] });
    const [inPair] = await tx.select({ id: links.id }).from(links).where(and(eq(links.childId, cabinet.id), isNull(links.endedAt))).limit(1);
    if (inPair) throw new AppError(409, `${cabinet.identity} already belongs to a pair.`, { cabinet: ["Choose a cabinet in no pair."] });
    const by: Recorder = { actorId: actor.id, station: "quality", reason: input.reason };
    await fit(tx, { parent: pair, child: cabinet, position: CAB_POSITION[empty], data: { repartner: true, approvedBy: actor.id } }, by);
    await changeState(tx, pair, "in_production", by, { newPartner: cabinet.identity });
    return cabinet;
  });
}

// ---- the shop's home ----------------------------------------------------------------------------

export interface ShopPair {
  pair: string;
  model: string;
  finish: string | null;
  next: { seq: number; name: string; station: string } | null;
  sides: Side[];
  holdUntil: Date | null;
  holdLabel: string | null;
  openNcs: string[];
  /** Since when the next step has been allowed (the last step's time or the hold's release). */
  readySince: Date | null;
  unpartnered: boolean;
  /** A lacquer cabinet on the route by itself (no pair yet). */
  lone: boolean;
}

/** A pair whose next step has been allowed this long without being done is overdue (the demo workshop's rule). */
export const OVERDUE_AFTER_MS = 48 * 3600_000;

/** Every pair still on the cabinet route, where it is now. */
export async function shopPairs(db: DbOrTx, at: Date = clockNow()): Promise<ShopPair[]> {
  const pairs = await db.select().from(items).where(and(eq(items.kind, "pair"), inArray(items.state, ["in_production", "unpartnered"]))).orderBy(asc(items.createdAt));
  // Lacquer cabinets in no pair, still on the route.
  const lone = await db
    .select({ item: items })
    .from(items)
    .innerJoin(finishes, eq(finishes.id, items.finishId))
    .where(and(eq(items.kind, "cabinet"), eq(finishes.kind, "lacquer"), inArray(items.state, ["in_progress", "in_route"]), sql`NOT EXISTS (SELECT 1 FROM links l WHERE l.child_id = ${items.id} AND l.ended_at IS NULL)`))
    .orderBy(asc(items.createdAt));
  pairs.push(...lone.map((l) => l.item));
  const out: ShopPair[] = [];
  for (const pair of pairs) {
    // Lacquer pairs are paired at assembly from cabinets that already finished: no route for them here.
    if (pair.attrs.pairedAt === "assembly") continue;
    let route: PairRoute;
    try {
      route = await pairRoute(db, pair, at);
    } catch {
      continue;
    }
    if (route.position.finished || !route.cabinets.length) continue;
    // The pair's next step: the earliest next step of its cabinets (a cabinet ahead waits for the other).
    const withNext = route.position.cabinets.filter((c) => c.next);
    const first = withNext.sort((a, b) => a.next!.seq - b.next!.seq)[0]!;
    const sides = withNext.filter((c) => c.next!.seq === first.next!.seq).map((c) => c.side);
    const holdUntil = withNext.filter((c) => sides.includes(c.side)).map((c) => c.holdUntil).filter((d): d is Date => d !== null).sort((a, b) => b.getTime() - a.getTime())[0] ?? null;
    const lastRecord = route.records.at(-1);
    const lastHold = route.position.cabinets.map((c) => c.holdUntil).filter(Boolean) as Date[];
    const readySince = holdUntil ? null : lastHold.length ? null : (lastRecord?.recordedAt ?? pair.createdAt);
    out.push({
      pair: pair.identity,
      model: route.model.code,
      finish: route.finishName,
      next: { seq: first.next!.seq, name: first.next!.name, station: first.next!.station },
      sides,
      holdUntil,
      holdLabel: withNext.find((c) => c.holdUntil)?.holdLabel ?? null,
      openNcs: route.position.openNcs,
      readySince,
      unpartnered: pair.kind === "pair" && route.cabinets.length < 2,
      lone: pair.kind === "cabinet",
    });
  }
  return out;
}

export async function openNonconformances(db: DbOrTx) {
  return db
    .select({ nc: nonconformances, pair: items.identity })
    .from(nonconformances)
    .innerJoin(items, eq(items.id, nonconformances.pairId))
    .where(isNull(nonconformances.disposition))
    .orderBy(asc(nonconformances.openedAt));
}
