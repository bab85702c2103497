/** Nonconformances: the open ones, quality's disposition, and a new partner for a pair that lost a cabinet. */
import "server-only";
import { and, asc, desc, eq, inArray, isNotNull, isNull, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { items, links, nonconformances, processSpecs, routeStarts, type Item, type Nonconformance } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now as clockNow } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { changeState, fit, itemByIdentity, removeFrom, type Recorder } from "@/lib/genealogy/graph";
import { parseSerial } from "@/lib/serials/format";
import type { Actor } from "@/lib/vocabulary/actor";
import { PAIR_CABINET_POSITION as CAB_POSITION, sideOfCabinetPosition } from "@/lib/vocabulary/positions";
import type { Side } from "./types";
import { routeOf } from "./pair-route";
import { DISPOSITION_WORDS, dispositionSentence, type Disposition } from "./words";
import { entryErrorRefusal, entryErrorsReady } from "./corrections";

/**
 * Quality's decision on a nonconformance, once: rework to a named step, use as is, scrap one
 * cabinet, or close it as an entry error, which only a nonconformance whose record a correction
 * has brought back inside every window may take (lib/route/corrections.ts).
 */
export async function dispositionNc(
  db: DbOrTx,
  input: { ncId: string; disposition: Disposition; reworkToSeq?: number | null; scrapSide?: Side | null; reason: string },
  actor: Actor,
): Promise<{ code: string }> {
  return db.transaction(async (tx) => {
    const at = clockNow();
    const [nc] = await tx.select().from(nonconformances).where(eq(nonconformances.id, input.ncId)).limit(1);
    if (!nc) throw new AppError(404, "That nonconformance is not in the register.");
    if (nc.disposition) throw new AppError(409, `${nc.code} was already dispositioned (${DISPOSITION_WORDS[nc.disposition]}).`);
    const [pair] = await tx.select().from(items).where(eq(items.id, nc.pairId)).limit(1);
    const route = await routeOf(tx, pair!, at);
    let reworkToSeq: number | null = null;
    let scrapCabinet: Item | null = null;
    // Seq 0 is the final pair test: rework means adjust and test again; use as is accepts the deviation.
    const finalTest = nc.seq === 0;
    if (finalTest && input.disposition === "scrap") throw new AppError(400, "A final-test nonconformance is reworked (adjusted and tested again) or used as is.", { disposition: ["Choose rework or use as is."] });
    if (input.disposition === "entry_error") {
      const refusal = await entryErrorRefusal(tx, nc);
      if (refusal) throw new AppError(409, refusal, { disposition: ["Correct the reading first, or choose another disposition."] });
    }
    if (finalTest && input.disposition === "rework") reworkToSeq = 0;
    else if (input.disposition === "rework") {
      const step = route.spec.steps.find((s) => s.seq === input.reworkToSeq);
      if (!step) throw new AppError(400, "Choose the step to go back to.", { reworkToSeq: ["Choose a step of the route."] });
      if (step.seq > nc.seq) throw new AppError(400, `Rework goes back: choose step ${nc.seq} or an earlier one.`, { reworkToSeq: [`Step ${nc.seq} or earlier.`] });
      reworkToSeq = step.seq;
    }
    if (input.disposition === "scrap") {
      const c = route.cabinets.find((x) => x.side === input.scrapSide);
      if (!c) throw new AppError(400, route.group.kind === "trim_part" ? "Choose the trim part to scrap." : "Choose the cabinet to scrap.", { scrapSide: [route.group.kind === "pair" ? "Choose left or right." : "Choose it to scrap it."] });
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
    if (scrapCabinet && route.group.kind !== "pair") {
      // A lone lacquer cabinet or a trim part: nothing to break apart.
      await changeState(tx, scrapCabinet, "scrapped", { actorId: actor.id, station: "quality", reason: input.reason }, { nc: nc.code });
    } else if (scrapCabinet) {
      const by: Recorder = { actorId: actor.id, station: "quality", reason: input.reason };
      await removeFrom(tx, { parent: pair!, child: scrapCabinet, data: { nc: nc.code } }, { ...by, reason: `scrapped under ${nc.code}: ${input.reason}` });
      await changeState(tx, scrapCabinet, "scrapped", by, { nc: nc.code });
      await changeState(tx, pair!, "unpartnered", by, { scrapped: scrapCabinet.identity });
    }
    return { code: nc.code };
  });
}

/**
 * The confirmation of a recorded disposition, from the register as it is now: "NC-2612-003:
 * rework back to step 4, Sanding. The pair is released." Null when no such nonconformance has a
 * disposition (or, with `pairId`, when it is another pair's).
 */
export async function dispositionSummary(db: DbOrTx, code: string, opts: { pairId?: string } = {}): Promise<string | null> {
  const [nc] = await db.select().from(nonconformances).where(eq(nonconformances.code, code)).limit(1);
  if (!nc?.disposition || (opts.pairId && nc.pairId !== opts.pairId)) return null;
  const [holder] = await db.select().from(items).where(eq(items.id, nc.pairId)).limit(1);
  if (!holder) return null;
  const stillOpen = await db
    .select({ code: nonconformances.code })
    .from(nonconformances)
    .where(and(eq(nonconformances.pairId, nc.pairId), isNull(nonconformances.disposition)))
    .orderBy(asc(nonconformances.openedAt));
  let reworkToName: string | null = null;
  if (nc.reworkToSeq) {
    try {
      reworkToName = (await routeOf(db, holder)).spec.steps.find((s) => s.seq === nc.reworkToSeq)?.name ?? null;
    } catch {
      // A pair whose route cannot be read now (no spec): the step's number alone.
    }
  }
  const [scrapped] = nc.scrapCabinetId ? await db.select({ identity: items.identity }).from(items).where(eq(items.id, nc.scrapCabinetId)).limit(1) : [];
  return dispositionSentence({
    code: nc.code,
    disposition: nc.disposition,
    seq: nc.seq,
    reworkToSeq: nc.reworkToSeq,
    reworkToName,
    scrapped: scrapped ? { identity: scrapped.identity, side: holder.kind !== "pair" ? null : (nc.cabinets.find((c) => c.id === nc.scrapCabinetId)?.side ?? null) } : null,
    holder: holder.kind === "pair" ? "pair" : holder.kind === "trim_part" ? "trim part" : "cabinet",
    stillOpen: stillOpen.map((o) => o.code),
  });
}

/**
 * Gives a pair that lost a cabinet a new partner: quality's sign-off, with its reason. The new
 * cabinet is of the same model and finish and in no pair; it starts the route from the beginning.
 */
export async function repartner(db: DbOrTx, input: { pairId: string; cabinet: string; reason: string }, actor: Actor): Promise<Item> {
  return db.transaction(async (tx) => {
    const [pair] = await tx.select().from(items).where(eq(items.id, input.pairId)).limit(1);
    if (!pair || pair.kind !== "pair") throw new AppError(404, "That pair is not in the register.");
    const route = await routeOf(tx, pair);
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


/** The nonconformances not yet dispositioned, oldest first, with the serial of the pair (or lone cabinet) each holds. */
export async function openNonconformances(db: DbOrTx) {
  return db
    .select({ nc: nonconformances, pair: items.identity })
    .from(nonconformances)
    .innerJoin(items, eq(items.id, nonconformances.pairId))
    .where(isNull(nonconformances.disposition))
    .orderBy(asc(nonconformances.openedAt));
}

export interface NcToDisposition {
  nc: Nonconformance;
  pair: string;
  /** The steps rework may go back to: those of the pair's route up to the step that found it. */
  steps: { seq: number; name: string }[];
  /** The cabinets the pair holds now, by side (a lone lacquer cabinet is its own left side). */
  sides: { side: Side; identity: string }[];
  /** Set when a correction has brought its record back inside every window: it may close as an entry error. */
  entryError: { words: string; reason: string } | null;
}

/**
 * Quality's worklist: every open nonconformance with what its disposition form offers. Five
 * queries whatever the number of nonconformances: the open ones, the route version each pair
 * started under, the newest version per model for pairs not yet started, the cabinets held, and the corrections
 * that make some of them entry errors.
 */
export async function ncsToDisposition(db: DbOrTx): Promise<NcToDisposition[]> {
  const open = await db
    .select({ nc: nonconformances, pair: items })
    .from(nonconformances)
    .innerJoin(items, eq(items.id, nonconformances.pairId))
    .where(isNull(nonconformances.disposition))
    .orderBy(asc(nonconformances.openedAt));
  if (!open.length) return [];
  const pairIds = [...new Set(open.map((o) => o.pair.id))];
  const started = await db
    .select({ pairId: routeStarts.pairId, steps: processSpecs.steps })
    .from(routeStarts)
    .innerJoin(processSpecs, eq(processSpecs.id, routeStarts.specId))
    .where(inArray(routeStarts.pairId, pairIds));
  const modelIds = [...new Set(open.map((o) => o.pair.modelId).filter((m): m is string => Boolean(m)))];
  const newest = modelIds.length
    ? await db
        .select({ modelId: processSpecs.modelId, steps: processSpecs.steps })
        .from(processSpecs)
        .where(and(inArray(processSpecs.modelId, modelIds), eq(processSpecs.routeKind, "cabinet"), sql`${processSpecs.version} = (SELECT max(p2.version) FROM process_specs p2 WHERE p2.model_id = ${processSpecs.modelId} AND p2.route_kind = 'cabinet')`))
    : [];
  const held = await db
    .select({ pairId: links.parentId, position: links.position, identity: items.identity })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(inArray(links.parentId, pairIds), isNull(links.endedAt), inArray(links.position, [CAB_POSITION.L, CAB_POSITION.R])));
  const ready = await entryErrorsReady(db, open.map((o) => o.nc));
  return open.map(({ nc, pair }) => {
    const steps = started.find((s) => s.pairId === pair.id)?.steps ?? newest.find((n) => n.modelId === pair.modelId)?.steps ?? [];
    const sides =
      pair.kind !== "pair"
        ? [{ side: "L" as Side, identity: pair.identity }]
        : held
            .filter((h) => h.pairId === pair.id)
            .map((h) => ({ side: sideOfCabinetPosition(h.position)!, identity: h.identity }))
            .sort((a, b) => a.side.localeCompare(b.side));
    return { nc, pair: pair.identity, steps: steps.filter((s) => s.seq <= nc.seq).map((s) => ({ seq: s.seq, name: s.name })), sides, entryError: ready.get(nc.id) ?? null };
  });
}

/** The newest dispositioned nonconformances, for quality's record. */
export function dispositionedNonconformances(db: DbOrTx, limit = 50) {
  return db.select().from(nonconformances).where(isNotNull(nonconformances.disposition)).orderBy(desc(nonconformances.dispositionedAt)).limit(limit);
}
