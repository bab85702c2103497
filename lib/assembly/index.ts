import "server-only";
import { and, asc, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { batchUnits, events, finishes, items, links, matchedSets, modelPositions, models, responses, setMembers, type Finish, type Item, type Model } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now as clockNow } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { changeState, createItem, fit, itemByIdentity, removeFrom, type Recorder } from "@/lib/genealogy/graph";
import { stateLabel } from "@/lib/genealogy/kinds";
import { openSets } from "@/lib/lab/units";
import { CAB_POSITION, pairRoute, type PairRoute } from "@/lib/route/server";
import { allocateSerial } from "@/lib/serials/allocator";
import { normaliseScan, serialReadings } from "@/lib/serials/format";

/**
 * The assembly station: a pair whose cabinets finished their route is built, scan by scan, into
 * two speakers from the lab's matched drive-unit sets and crossover boards. Every scan is checked
 * by one function, `checkScan`, which writes nothing; `buildSpeakers` runs the same checks again
 * inside the one transaction that writes the build, so what the browser showed cannot be trusted
 * into the register.
 */

export const ASSEMBLY_STATION = "assembly";
export type Side = "L" | "R";
export const SIDES: readonly Side[] = ["L", "R"];
/** The crossover board's slot in a speaker, and its link position. */
export const XO_SLOT = "XO";
/** Where a speaker holds its cabinet, and where a pair holds its two speakers. */
export const SPEAKER_CABINET_POSITION = "CAB";
export const PAIR_SPEAKER_POSITION: Record<Side, string> = { L: "L", R: "R" };

export interface AssemblyActor {
  id: string;
}

type PartType = "tweeter" | "midrange" | "bass";
const PART_ORDER: Record<PartType, number> = { tweeter: 0, midrange: 1, bass: 2 };
const PART_WORD: Record<PartType, string> = { tweeter: "tweeter", midrange: "midrange unit", bass: "bass unit" };
const partWord = (t: string | null | undefined) => (t && t in PART_WORD ? PART_WORD[t as PartType] : "drive unit");
export const sideWord = (s: Side) => (s === "L" ? "left" : "right");
const KIND_WORD: Record<string, string> = {
  flitch: "flitch",
  leaf: "veneer leaf",
  cabinet: "cabinet",
  drive_unit: "drive unit",
  crossover: "crossover board",
  component_lot: "component lot",
  speaker: "speaker",
  pair: "pair",
  carton: "carton",
  shipment: "shipment",
};

/** One scan field of a speaker: a drive-unit position of the model, or the crossover. */
export interface Slot {
  /** The link position in the speaker: the model's position code ("T", "B1"), or "XO". */
  slot: string;
  kind: "drive_unit" | "crossover";
  partType: PartType | null;
  /** How a fitter names it: "tweeter", "bass unit at B2", "crossover". */
  label: string;
}

/**
 * The slots of a model's speaker, tweeter first, then midrange, bass, and the crossover last. A
 * position that takes more than one unit (count > 1; no model of the demo workshop has one) gets
 * one slot per unit, "B-1", "B-2", so every unit has a link position of its own.
 */
export function slotsOf(positions: { position: string; partType: PartType; count: number }[]): Slot[] {
  const sorted = [...positions].sort((a, b) => PART_ORDER[a.partType] - PART_ORDER[b.partType] || a.position.localeCompare(b.position, undefined, { numeric: true }));
  const codes = sorted.flatMap((p) => (p.count > 1 ? Array.from({ length: p.count }, (_, i) => ({ code: `${p.position}-${i + 1}`, partType: p.partType })) : [{ code: p.position, partType: p.partType }]));
  const perType = (t: PartType) => codes.filter((c) => c.partType === t).length;
  const slots: Slot[] = codes.map((c) => ({ slot: c.code, kind: "drive_unit", partType: c.partType, label: perType(c.partType) > 1 ? `${PART_WORD[c.partType]} at ${c.code}` : PART_WORD[c.partType] }));
  slots.push({ slot: XO_SLOT, kind: "crossover", partType: null, label: "crossover" });
  return slots;
}

export const slotKey = (side: Side, slot: string) => `${side}.${slot}`;

// ---- the pair at the station --------------------------------------------------------------------

interface PairContext {
  pair: Item;
  model: Model;
  finish: Finish | null;
  slots: Slot[];
  route: PairRoute | null;
  cabinets: { side: Side; item: Item }[];
  speakers: { side: Side; item: Item }[];
  /** Paired here from two finished lacquer cabinets (they have no route records of their own). */
  lacquer: boolean;
  routeFinished: boolean;
  /** The next step of the route in words, while it is not finished. */
  next: string | null;
  openNcs: { code: string; finding: string }[];
  /** Why nothing can be fitted into this pair now, or null when it is ready. */
  blocked: string | null;
}

async function pairContext(db: DbOrTx, pair: Item, at: Date = clockNow()): Promise<PairContext> {
  if (pair.kind !== "pair" || !pair.modelId) throw new AppError(400, `${pair.identity} is not a pair of a model.`);
  const [model] = await db.select().from(models).where(eq(models.id, pair.modelId)).limit(1);
  const [finish] = pair.finishId ? await db.select().from(finishes).where(eq(finishes.id, pair.finishId)).limit(1) : [];
  const positions = await db.select().from(modelPositions).where(eq(modelPositions.modelId, pair.modelId));
  const slots = slotsOf(positions);
  let route: PairRoute | null = null;
  let routeProblem: string | null = null;
  try {
    route = await pairRoute(db, pair, at);
  } catch (e) {
    if (!(e instanceof AppError)) throw e;
    routeProblem = e.message;
  }
  const held = await db
    .select({ item: items, position: links.position })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(eq(links.parentId, pair.id), isNull(links.endedAt), inArray(links.position, [CAB_POSITION.L, CAB_POSITION.R, PAIR_SPEAKER_POSITION.L, PAIR_SPEAKER_POSITION.R])));
  const cabinets = held.filter((h) => h.position.startsWith("CAB-")).map((h) => ({ side: (h.position === CAB_POSITION.L ? "L" : "R") as Side, item: h.item })).sort((a, b) => a.side.localeCompare(b.side));
  const speakers = held.filter((h) => h.item.kind === "speaker").map((h) => ({ side: h.position as Side, item: h.item })).sort((a, b) => a.side.localeCompare(b.side));
  const lacquer = pair.attrs?.pairedAt === "assembly";
  const openNcs = (route?.ncs ?? []).filter((n) => !n.disposition).map((n) => ({ code: n.code, finding: n.finding }));

  // A lacquer pair made here was two finished cabinets when it was paired; the route of unpaired
  // lacquer cabinets is recorded outside the register for now, so their state is what says so.
  const lacquerDone = lacquer && (route?.records.length ?? 0) === 0 && cabinets.length === 2 && cabinets.every((c) => c.item.state === "finished");
  const routeFinished = Boolean(route && cabinets.length === 2 && (route.position.finished || lacquerDone));
  let next: string | null = null;
  if (route && !routeFinished) {
    const pending = route.position.cabinets.filter((c) => c.next);
    const first = pending.sort((a, b) => a.next!.seq - b.next!.seq)[0];
    if (first) {
      const sides = pending.filter((c) => c.next!.seq === first.next!.seq).map((c) => c.side);
      next = `${first.next!.seq}, ${first.next!.name}${sides.length === 1 && cabinets.length === 2 ? ` (${sideWord(sides[0]!)} cabinet)` : ""}`;
    } else if (lacquer) {
      next = cabinets
        .filter((c) => c.item.state !== "finished")
        .map((c) => `${c.item.identity} is ${stateLabel(c.item.state)}`)
        .join("; ");
    }
  }

  let blocked: string | null = null;
  if (speakers.length) blocked = `${pair.identity} is built already: its speakers are ${speakers.map((s) => s.item.identity).join(" and ")}.`;
  else if (pair.state === "unpartnered") blocked = `${pair.identity} is unpartnered: it lost a cabinet, and quality signs off a new partner before it is assembled.`;
  else if (pair.state !== "in_production") blocked = `${pair.identity} is ${stateLabel(pair.state)}: only a pair in production is built into speakers.`;
  else if (routeProblem) blocked = routeProblem;
  else if (cabinets.length < 2) blocked = `${pair.identity} has no ${SIDES.filter((s) => !cabinets.some((c) => c.side === s)).map(sideWord).join(" or ")} cabinet now.`;
  else if (openNcs.length) blocked = `${pair.identity} is on hold: ${openNcs.map((n) => `${n.code} (${n.finding})`).join("; ")} is open. Quality dispositions it before assembly.`;
  else if (cabinets.some((c) => c.item.state === "scrapped")) blocked = `${pair.identity} holds a scrapped cabinet.`;
  else if (!routeFinished) blocked = `The cabinets have not finished their route: next step is ${next ?? "not known"}.`;

  return { pair, model: model!, finish: finish ?? null, slots, route, cabinets, speakers, lacquer, routeFinished, next, openNcs, blocked };
}

// ---- reading one scan ---------------------------------------------------------------------------

/** The item a scan names: a Twinleaf serial (forgiving missing hyphens and case), or a drive unit's maker serial. */
async function findScanned(db: DbOrTx, code: string): Promise<{ item: Item } | { reason: string }> {
  const text = normaliseScan(code);
  if (!text) return { reason: "Scan or type the label." };
  const readings = serialReadings(text);
  for (const r of readings.filter((x) => x.valid)) {
    const hit = await itemByIdentity(db, r.canonical);
    if (hit) return { item: hit };
  }
  const direct = await itemByIdentity(db, text);
  if (direct) return { item: direct };
  const byMaker = await db
    .select({ item: items })
    .from(batchUnits)
    .innerJoin(items, eq(items.id, batchUnits.itemId))
    .where(inArray(batchUnits.makerSerial, [...new Set([code.trim(), text])]))
    .limit(2);
  if (byMaker.length === 1) return { item: byMaker[0]!.item };
  if (readings.length && !readings.some((r) => r.valid)) {
    return { reason: `${readings[0]!.canonical} does not check: its last character does not fit the rest, so it was misread or mistyped. Scan the label again.` };
  }
  return { reason: `${text} is not in the register: check the label and scan again.` };
}

/** The open (non-shared) link that holds an item now: what it sits in, and where. */
async function holderOf(db: DbOrTx, itemId: string) {
  const [row] = await db
    .select({ parent: links.parentIdentity, parentId: links.parentId, position: links.position })
    .from(links)
    .where(and(eq(links.childId, itemId), isNull(links.endedAt), eq(links.shared, false)))
    .limit(1);
  if (!row) return null;
  const parent = row.parent ?? (await db.select({ identity: items.identity }).from(items).where(eq(items.id, row.parentId)).limit(1))[0]?.identity ?? "another item";
  return { parent, position: row.position };
}

interface OpenMembership {
  memberId: number;
  setId: string;
  code: string;
  kind: "drive_unit" | "crossover";
  modelId: string | null;
  modelCode: string | null;
  side: Side;
  partner: { itemId: string; identity: string } | null;
}

/** The matched set an item is reserved in now, with its partner on the other side. */
async function openMembership(db: DbOrTx, itemId: string): Promise<OpenMembership | null> {
  const [m] = await db
    .select({ memberId: setMembers.id, setId: matchedSets.id, code: matchedSets.code, kind: matchedSets.kind, modelId: matchedSets.modelId, modelCode: models.code, side: setMembers.side })
    .from(setMembers)
    .innerJoin(matchedSets, eq(matchedSets.id, setMembers.setId))
    .leftJoin(models, eq(models.id, matchedSets.modelId))
    .where(and(eq(setMembers.itemId, itemId), isNull(setMembers.endedAt)))
    .limit(1);
  if (!m) return null;
  const [partner] = await db
    .select({ itemId: items.id, identity: items.identity })
    .from(setMembers)
    .innerJoin(items, eq(items.id, setMembers.itemId))
    .where(and(eq(setMembers.setId, m.setId), sql`${setMembers.itemId} <> ${itemId}`))
    .limit(1);
  return { ...m, partner: partner ?? null };
}

async function hasUnitResponse(db: DbOrTx, itemId: string) {
  const [r] = await db.select({ id: responses.id }).from(responses).where(and(eq(responses.itemId, itemId), eq(responses.purpose, "unit"))).limit(1);
  return Boolean(r);
}

/** Why an item was set aside: the reason of its newest change of state to "failed". */
async function failureReason(db: DbOrTx, itemId: string): Promise<string | null> {
  const [e] = await db
    .select({ reason: events.reason })
    .from(events)
    .where(and(eq(events.subjectKind, "item"), eq(events.subjectId, itemId), eq(events.type, "item.state_changed"), sql`json_extract(${events.data}, '$.to') = 'failed'`))
    .orderBy(desc(events.id))
    .limit(1);
  return e?.reason?.trim() || null;
}

export interface ChosenPart {
  side: Side;
  slot: string;
  itemId: string;
}

export interface ScanInput {
  pairId: string;
  side: Side;
  /** A position code of the pair's model, or "XO". */
  slot: string;
  code: string;
  /** What this build has accepted so far at the other fields (the field being scanned is ignored). */
  chosen: ChosenPart[];
}

export type ScanCheck = { ok: true; item: { id: string; identity: string; partType: string | null } } | { ok: false; reason: string };

const refuse = (reason: string): ScanCheck => ({ ok: false, reason });

async function checkScanIn(db: DbOrTx, ctx: PairContext, input: Omit<ScanInput, "pairId">): Promise<ScanCheck & { full?: Item }> {
  if (ctx.blocked) return refuse(ctx.blocked);
  const side = input.side;
  if (side !== "L" && side !== "R") return refuse("A speaker is either left or right.");
  const wanted = input.slot.trim().toUpperCase();
  const slot = ctx.slots.find((s) => s.slot === wanted);
  if (!slot) return refuse(`${input.slot} is not a position of the ${ctx.model.code}: its positions are ${ctx.slots.map((s) => s.slot).join(", ")}.`);
  const found = await findScanned(db, input.code);
  if ("reason" in found) return refuse(found.reason);
  const item = found.item;
  const here = `position ${slot.slot}`;

  if (slot.kind === "crossover") {
    if (item.kind !== "crossover") return refuse(`${item.identity} is a ${item.kind === "drive_unit" ? partWord(item.partType) : KIND_WORD[item.kind] ?? item.kind}; the XO slot takes a crossover board.`);
    if (item.modelId !== ctx.model.id) {
      const [other] = item.modelId ? await db.select({ code: models.code }).from(models).where(eq(models.id, item.modelId)).limit(1) : [];
      return refuse(`${item.identity} is a crossover for the ${other?.code ?? "another model"}; this pair is a ${ctx.model.code}.`);
    }
  } else {
    if (item.kind !== "drive_unit") return refuse(`${item.identity} is a ${KIND_WORD[item.kind] ?? item.kind}; ${here} takes a ${partWord(slot.partType)}.`);
    if (item.partType !== slot.partType) return refuse(`${item.identity} is a ${partWord(item.partType)}; ${here} takes a ${partWord(slot.partType)}.`);
  }

  const others = input.chosen.filter((c) => !(c.side === side && c.slot === slot.slot));
  const twice = others.find((c) => c.itemId === item.id);
  if (twice) {
    const where = ctx.slots.find((s) => s.slot === twice.slot)?.label ?? twice.slot;
    return refuse(`${item.identity} is already scanned for the ${sideWord(twice.side)} ${where} in this build: each part goes in once.`);
  }

  if (item.state === "failed") {
    const why = await failureReason(db, item.id);
    return refuse(`${item.identity} failed on the bench: ${why ?? "no reason was recorded"}. It cannot be fitted.`);
  }
  const holder = await holderOf(db, item.id);
  if (holder) return refuse(`${item.identity} is already in ${holder.parent} at ${holder.position}.`);
  if (item.state === "scrapped") return refuse(`${item.identity} is scrapped.`);

  const set = await openMembership(db, item.id);
  if (slot.kind === "drive_unit") {
    if (!(await hasUnitResponse(db, item.id))) return refuse(`${item.identity} has no measured response: the lab measures every unit before it is matched and fitted.`);
    if (!set || set.kind !== "drive_unit") return refuse(`${item.identity} is not in a matched set; the lab reserves units in sets before assembly.`);
    if (set.modelId && set.modelId !== ctx.model.id) return refuse(`${item.identity} is in set ${set.code}, matched for the ${set.modelCode ?? "another model"}; this pair is a ${ctx.model.code}.`);
    if (item.state !== "reserved") return refuse(`${item.identity} is ${stateLabel(item.state)}: only a unit reserved in a matched set is fitted.`);
  } else if (set) {
    if (set.modelId && set.modelId !== ctx.model.id) return refuse(`${item.identity} is in set ${set.code}, matched for the ${set.modelCode ?? "another model"}; this pair is a ${ctx.model.code}.`);
    if (item.state !== "reserved") return refuse(`${item.identity} is ${stateLabel(item.state)}: it cannot be fitted.`);
  } else if (item.state !== "in_stock") {
    return refuse(`${item.identity} is ${stateLabel(item.state)}: only a board that passed its check and is in stock, or reserved in a crossover set, is fitted.`);
  }

  // Left and right of a position come from one matched set: the partner rule, from both ends.
  const other = others.find((c) => c.side !== side && c.slot === slot.slot);
  if (other) {
    const otherSet = await openMembership(db, other.itemId);
    const [otherItem] = await db.select({ identity: items.identity }).from(items).where(eq(items.id, other.itemId)).limit(1);
    if (otherSet) {
      if (otherSet.partner?.itemId !== item.id) {
        return refuse(`The ${sideWord(other.side)} ${slot.label} is from set ${otherSet.code}; the ${sideWord(side)} one must be its partner ${otherSet.partner?.identity ?? "(none recorded)"}.`);
      }
    } else if (set) {
      return refuse(`${item.identity} is in set ${set.code}: its partner ${set.partner?.identity ?? "(none recorded)"} goes on the ${sideWord(other.side)}, but the ${sideWord(other.side)} ${slot.label} is ${otherItem?.identity ?? "another part"}.`);
    }
  }
  return { ok: true, item: { id: item.id, identity: item.identity, partType: item.partType }, full: item };
}

/**
 * Checks one scan at the station and writes nothing. Refuses, each with a reason a fitter reads
 * at the bench: a pair on hold or whose cabinets have not finished their route (or already built);
 * an unknown or misread serial; the wrong kind of part for the field; the wrong part type for the
 * position; a crossover of another model; a part failed on the bench or never measured; a part
 * already fitted elsewhere; a drive unit not reserved in a matched set (or in one matched for
 * another model); a part that is not the set partner of the one chosen at the same position on
 * the other side; a part scanned twice in this build.
 */
export async function checkScan(db: DbOrTx, input: ScanInput): Promise<ScanCheck> {
  const [pair] = await db.select().from(items).where(eq(items.id, input.pairId)).limit(1);
  if (!pair || pair.kind !== "pair") return refuse("That pair is not in the register.");
  const ctx = await pairContext(db, pair);
  const { full: _full, ...result } = (await checkScanIn(db, ctx, input)) as ScanCheck & { full?: Item };
  return result as ScanCheck;
}

// ---- building -----------------------------------------------------------------------------------

export interface BuildInput {
  pairId: string;
  scans: { side: Side; slot: string; code: string }[];
  inspection: { clean: boolean; inspected: boolean; note: string };
}

export interface BuildResult {
  pair: Item;
  speakers: Record<Side, Item>;
}

const NOTE_MAX = 500;

/**
 * Builds a pair's two speakers in one transaction. Every scan is checked again here with the same
 * rules as `checkScan`; every position of the model on both sides and the crossover must be
 * scanned, and the final clean and inspection ticked. Any problem refuses the whole build with
 * each field's reason under "L.T", "R.XO"… and nothing is written. Then: two speakers with
 * serials; each cabinet leaves the pair ("built into its speaker") and sits in its speaker at CAB;
 * each drive unit at its position and the crossover at XO, their set reservations ended once
 * ("fitted", with an event) and their states "fitted"; the speakers "built" and fitted into the
 * pair at L and R; the pair "awaiting_test"; and the events "pair.assembled" and "pair.inspected".
 */
export async function buildSpeakers(db: DbOrTx, input: BuildInput, actor: AssemblyActor): Promise<BuildResult> {
  return db.transaction(async (tx) => {
    const [pair] = await tx.select().from(items).where(eq(items.id, input.pairId)).limit(1);
    if (!pair || pair.kind !== "pair") throw new AppError(404, "That pair is not in the register.");
    const ctx = await pairContext(tx, pair);
    if (ctx.blocked) throw new AppError(409, `Nothing was built: ${ctx.blocked}`);

    const errors: Record<string, string[]> = {};
    const add = (key: string, message: string) => (errors[key] ??= []).push(message);
    let refusals = 0;

    const bySlot = new Map<string, { side: Side; slot: string; code: string }>();
    for (const s of input.scans) {
      const slot = s.slot.trim().toUpperCase();
      if (!s.code.trim()) continue;
      if (!ctx.slots.some((x) => x.slot === slot) || (s.side !== "L" && s.side !== "R")) {
        add("scans", `${s.side}/${s.slot} is not a field of the ${ctx.model.code}.`);
        continue;
      }
      const key = slotKey(s.side, slot);
      if (bySlot.has(key)) add(key, "Two scans were sent for this field; scan it once.");
      else bySlot.set(key, { side: s.side, slot, code: s.code });
    }

    const chosen: ChosenPart[] = [];
    const picked = new Map<string, Item>();
    for (const side of SIDES) {
      for (const slot of ctx.slots) {
        const key = slotKey(side, slot.slot);
        if (errors[key]) continue;
        const scan = bySlot.get(key);
        if (!scan) {
          add(key, `Scan the ${sideWord(side)} ${slot.label}${slot.kind === "drive_unit" ? ` (${slot.slot})` : ""}.`);
          continue;
        }
        const r = await checkScanIn(tx, ctx, { side, slot: slot.slot, code: scan.code, chosen });
        if (r.ok) {
          chosen.push({ side, slot: slot.slot, itemId: r.item.id });
          picked.set(key, r.full!);
        } else {
          refusals++;
          add(key, r.reason);
        }
      }
    }
    if (!input.inspection.clean) add("clean", "Tick the final clean: both speakers cleaned, no dust, flux or fingerprints.");
    if (!input.inspection.inspected) add("inspected", "Tick the final inspection: every part seated, every joint and screw checked.");
    if (input.inspection.note.length > NOTE_MAX) add("note", `At most ${NOTE_MAX} characters.`);

    const keys = Object.keys(errors);
    if (keys.length) {
      const first = errors[keys[0]!]![0]!;
      const fields = keys.length === 1 ? "1 field needs" : `${keys.length} fields need`;
      throw new AppError(refusals ? 409 : 400, `Nothing was built: ${fields} attention. ${first}`, errors);
    }

    const by: Recorder = { actorId: actor.id, station: ASSEMBLY_STATION };
    const year = clockNow().getUTCFullYear();
    const speakers = {} as Record<Side, Item>;
    const parts: Record<Side, Record<string, string>> = { L: {}, R: {} };
    for (const side of SIDES) {
      const cabinet = ctx.cabinets.find((c) => c.side === side)!.item;
      const speaker = await createItem(
        tx,
        {
          kind: "speaker",
          identity: await allocateSerial(tx, { kind: "speaker", code: ctx.model.code, year }),
          state: "in_assembly",
          modelId: ctx.model.id,
          finishId: pair.finishId,
          attrs: { side, pair: pair.identity },
        },
        by,
      );
      await removeFrom(tx, { parent: pair, child: cabinet, data: { speaker: speaker.identity } }, { ...by, reason: "built into its speaker" });
      await fit(tx, { parent: speaker, child: cabinet, position: SPEAKER_CABINET_POSITION }, by);
      parts[side][SPEAKER_CABINET_POSITION] = cabinet.identity;
      for (const slot of ctx.slots) {
        const part = picked.get(slotKey(side, slot.slot))!;
        await fit(tx, { parent: speaker, child: part, position: slot.slot }, by);
        const member = await openMembership(tx, part.id);
        if (member) {
          const eventId = await appendEvent(tx, {
            actorId: actor.id,
            station: ASSEMBLY_STATION,
            type: "set.member_fitted",
            subjectKind: "set",
            subjectId: member.setId,
            data: { code: member.code, unit: part.identity, side: member.side, speaker: speaker.identity, position: slot.slot, pair: pair.identity },
          });
          const ended = await tx
            .update(setMembers)
            .set({ endedAt: new Date(), endEventId: eventId, endReason: "fitted" })
            .where(and(eq(setMembers.id, member.memberId), isNull(setMembers.endedAt)))
            .returning({ id: setMembers.id });
          if (ended.length !== 1) throw new AppError(409, `${part.identity}'s reservation ended a moment ago. Nothing was built; scan it again.`);
        }
        await changeState(tx, part, "fitted", by, { speaker: speaker.identity, position: slot.slot });
        parts[side][slot.slot] = part.identity;
      }
      await changeState(tx, speaker, "built", by);
      speakers[side] = speaker;
    }
    for (const side of SIDES) await fit(tx, { parent: pair, child: speakers[side], position: PAIR_SPEAKER_POSITION[side] }, by);
    await changeState(tx, pair, "awaiting_test", by);
    await appendEvent(tx, {
      actorId: actor.id,
      station: ASSEMBLY_STATION,
      type: "pair.assembled",
      subjectKind: "item",
      subjectId: pair.id,
      data: { identity: pair.identity, model: ctx.model.code, left: speakers.L.identity, right: speakers.R.identity, parts },
    });
    const note = input.inspection.note.trim();
    await appendEvent(tx, {
      actorId: actor.id,
      station: ASSEMBLY_STATION,
      type: "pair.inspected",
      subjectKind: "item",
      subjectId: pair.id,
      data: { identity: pair.identity, clean: true, inspected: true, note, speakers: [speakers.L.identity, speakers.R.identity] },
      reason: note || null,
    });
    return { pair, speakers };
  });
}

// ---- lacquer pairs ------------------------------------------------------------------------------

/**
 * Pairs two lacquer cabinets into a new pair (P-MODEL-…, "in production"), holding them at CAB-L
 * and CAB-R. Lacquer cabinets are made in batches without a pair, so they are paired here. Refuses
 * an unknown cabinet, the same one twice, a scrapped one, a veneered one (paired at the flitch),
 * one already in a pair, one that has not finished ("finished" state), and two of different models
 * or colours; each reason is under `left` or `right`, and nothing is written.
 *
 * Unpaired lacquer cabinets have no pair, so the route cannot record their steps (recordStep
 * works on pairs); how their route is recorded is outside this station. Until then a cabinet's
 * state "finished" is what says it is done, and a pair made here is taken as having finished its
 * route when both its cabinets are "finished" and it has no route records.
 */
export async function pairLacquerCabinets(db: DbOrTx, input: { left: string; right: string }, actor: AssemblyActor): Promise<{ pair: Item; left: Item; right: Item }> {
  return db.transaction(async (tx) => {
    const errors: Record<string, string[]> = {};
    const found: Partial<Record<"left" | "right", Item>> = {};
    for (const key of ["left", "right"] as const) {
      const text = input[key];
      const r = text.trim() ? await findScanned(tx, text) : { reason: `Scan the ${key} cabinet.` };
      if ("reason" in r) errors[key] = [r.reason];
      else if (r.item.kind !== "cabinet") errors[key] = [`${r.item.identity} is a ${KIND_WORD[r.item.kind] ?? r.item.kind}, not a cabinet.`];
      else found[key] = r.item;
    }
    const { left, right } = found;
    if (left && right && left.id === right.id) errors.right = [`${right.identity} is the left cabinet already: scan two different cabinets.`];
    const finishOf = new Map<string, Finish>();
    for (const key of ["left", "right"] as const) {
      const c = found[key];
      if (!c || errors[key]) continue;
      const [f] = c.finishId ? await tx.select().from(finishes).where(eq(finishes.id, c.finishId)).limit(1) : [];
      if (f) finishOf.set(c.id, f);
      const holder = await holderOf(tx, c.id);
      if (c.state === "scrapped") errors[key] = [`${c.identity} is scrapped.`];
      else if (f?.kind === "veneer") errors[key] = [`${c.identity} is veneered (${f.name}): veneered cabinets are paired at the flitch.`];
      else if (!f) errors[key] = [`${c.identity} has no lacquer colour recorded.`];
      else if (holder) errors[key] = [`${c.identity} is already in ${holder.parent} at ${holder.position}.`];
      else if (c.state !== "finished") errors[key] = [`${c.identity} is ${stateLabel(c.state)}: lacquer cabinets are paired once they have finished their route.`];
    }
    if (left && right && !errors.left && !errors.right) {
      if (left.modelId !== right.modelId) {
        const codes = await tx.select({ id: models.id, code: models.code }).from(models).where(inArray(models.id, [left.modelId ?? "", right.modelId ?? ""]));
        const code = (id: string | null) => codes.find((c) => c.id === id)?.code ?? "no model";
        errors.right = [`${left.identity} is a ${code(left.modelId)} and ${right.identity} a ${code(right.modelId)}: a pair is two cabinets of one model.`];
      } else if (left.finishId !== right.finishId) {
        errors.right = [`${left.identity} is ${finishOf.get(left.id)?.name} and ${right.identity} is ${finishOf.get(right.id)?.name}: a pair is two cabinets of one colour.`];
      }
    }
    const keys = Object.keys(errors);
    if (keys.length) throw new AppError(409, `Nothing was paired: ${errors[keys[0]!]![0]}`, errors);

    const [model] = await tx.select().from(models).where(eq(models.id, left!.modelId!)).limit(1);
    if (!model) throw new AppError(409, `${left!.identity} has no model recorded.`);
    const by: Recorder = { actorId: actor.id, station: ASSEMBLY_STATION };
    const pair = await createItem(
      tx,
      {
        kind: "pair",
        identity: await allocateSerial(tx, { kind: "pair", code: model.code, year: clockNow().getUTCFullYear() }),
        state: "in_production",
        modelId: model.id,
        finishId: left!.finishId,
        attrs: { pairedAt: "assembly" },
      },
      by,
    );
    await fit(tx, { parent: pair, child: left!, position: CAB_POSITION.L }, by);
    await fit(tx, { parent: pair, child: right!, position: CAB_POSITION.R }, by);
    await appendEvent(tx, {
      actorId: actor.id,
      station: ASSEMBLY_STATION,
      type: "pair.lacquer_paired",
      subjectKind: "item",
      subjectId: pair.id,
      data: { identity: pair.identity, model: model.code, colour: finishOf.get(left!.id)?.name ?? null, left: left!.identity, right: right!.identity },
    });
    return { pair, left: left!, right: right! };
  });
}

// ---- what the station reads ---------------------------------------------------------------------

export interface AssemblyView {
  pair: Item;
  model: Model;
  finish: Finish | null;
  lacquer: boolean;
  slots: Slot[];
  positions: { position: string; partType: PartType; count: number }[];
  cabinets: { side: Side; item: Item }[];
  routeFinished: boolean;
  next: string | null;
  openNcs: { code: string; finding: string }[];
  /** Why the pair cannot be built now (on hold, route not finished, built already…), or null. */
  blocked: string | null;
  /** Once assembled: each speaker with what sits in it. */
  speakers: { side: Side; item: Item; parts: { position: string; identity: string; kind: string; partType: string | null }[] }[];
}

/** A pair at the assembly station: its model and positions, cabinets, route, holds and, once built, its speakers. */
export async function assemblyView(db: DbOrTx, pairIdentity: string): Promise<AssemblyView | null> {
  const readings = serialReadings(pairIdentity).filter((r) => r.valid);
  const pair = (readings[0] ? await itemByIdentity(db, readings[0].canonical) : null) ?? (await itemByIdentity(db, normaliseScan(pairIdentity)));
  if (!pair || pair.kind !== "pair" || !pair.modelId) return null;
  const ctx = await pairContext(db, pair);
  const positions = await db.select({ position: modelPositions.position, partType: modelPositions.partType, count: modelPositions.count }).from(modelPositions).where(eq(modelPositions.modelId, ctx.model.id));
  const speakers: AssemblyView["speakers"] = [];
  for (const s of ctx.speakers) {
    const rows = await db
      .select({ position: links.position, identity: items.identity, kind: items.kind, partType: items.partType })
      .from(links)
      .innerJoin(items, eq(items.id, links.childId))
      .where(and(eq(links.parentId, s.item.id), isNull(links.endedAt)))
      .orderBy(asc(links.position));
    speakers.push({ side: s.side, item: s.item, parts: rows });
  }
  return {
    pair,
    model: ctx.model,
    finish: ctx.finish,
    lacquer: ctx.lacquer,
    slots: ctx.slots,
    positions,
    cabinets: ctx.cabinets,
    routeFinished: ctx.routeFinished,
    next: ctx.next,
    openNcs: ctx.openNcs,
    blocked: ctx.blocked,
    speakers,
  };
}

/** The pair a scanned label belongs to: the pair itself, one of its cabinets, or one of its speakers. */
export async function pairForScan(db: DbOrTx, code: string): Promise<Item> {
  const found = await findScanned(db, code);
  if ("reason" in found) throw new AppError(404, found.reason, { code: [found.reason] });
  const item = found.item;
  if (item.kind === "pair") return item;
  if (item.kind === "cabinet" || item.kind === "speaker") {
    const [holder] = await db
      .select({ pair: items })
      .from(links)
      .innerJoin(items, eq(items.id, links.parentId))
      .where(and(eq(links.childId, item.id), isNull(links.endedAt)))
      .limit(1);
    if (holder?.pair.kind === "pair") return holder.pair;
    if (holder?.pair.kind === "speaker") {
      const [up] = await db.select({ pair: items }).from(links).innerJoin(items, eq(items.id, links.parentId)).where(and(eq(links.childId, holder.pair.id), isNull(links.endedAt), eq(items.kind, "pair"))).limit(1);
      if (up) return up.pair;
    }
    if (item.kind === "cabinet" && !holder) {
      const [f] = item.finishId ? await db.select().from(finishes).where(eq(finishes.id, item.finishId)).limit(1) : [];
      const message = f?.kind === "lacquer" ? `${item.identity} is a lacquer cabinet in no pair yet: pair it with another of its model and colour below.` : `${item.identity} is in no pair now.`;
      throw new AppError(404, message, { code: [message] });
    }
  }
  const message = `${item.identity} is a ${KIND_WORD[item.kind] ?? item.kind}: scan a pair, cabinet or speaker label.`;
  throw new AppError(404, message, { code: [message] });
}

export interface WaitingPair {
  identity: string;
  model: string;
  finish: string | null;
  lacquer: boolean;
  cabinets: string[];
  openNcs: string[];
  /** When the route finished (its last record), or when the lacquer pair was made. */
  readySince: Date;
}

/** Pairs in production whose cabinets have finished their route, oldest first (those on hold flagged). */
export async function pairsAwaitingAssembly(db: DbOrTx, at: Date = clockNow()): Promise<WaitingPair[]> {
  const pairs = await db.select().from(items).where(and(eq(items.kind, "pair"), eq(items.state, "in_production"))).orderBy(asc(items.createdAt));
  const out: WaitingPair[] = [];
  for (const pair of pairs) {
    const ctx = await pairContext(db, pair, at);
    if (!ctx.routeFinished || ctx.speakers.length) continue;
    out.push({
      identity: pair.identity,
      model: ctx.model.code,
      finish: ctx.finish?.name ?? null,
      lacquer: ctx.lacquer,
      cabinets: ctx.cabinets.map((c) => c.item.identity),
      openNcs: ctx.openNcs.map((n) => n.code),
      readySince: ctx.route?.records.at(-1)?.recordedAt ?? pair.createdAt,
    });
  }
  return out.sort((a, b) => a.readySince.getTime() - b.readySince.getTime());
}

export interface LacquerGroup {
  modelId: string;
  model: string;
  modelName: string;
  finishId: string;
  colour: string;
  cabinets: string[];
}

/** Finished lacquer cabinets in no pair, by model and colour, oldest first within each. */
export async function unpairedLacquerCabinets(db: DbOrTx): Promise<LacquerGroup[]> {
  const rows = await db
    .select({ identity: items.identity, modelId: models.id, model: models.code, modelName: models.name, finishId: finishes.id, colour: finishes.name })
    .from(items)
    .innerJoin(finishes, eq(finishes.id, items.finishId))
    .innerJoin(models, eq(models.id, items.modelId))
    .where(
      and(
        eq(items.kind, "cabinet"),
        eq(items.state, "finished"),
        eq(finishes.kind, "lacquer"),
        sql`NOT EXISTS (SELECT 1 FROM ${links} l WHERE l.child_id = ${items.id} AND l.ended_at IS NULL)`,
      ),
    )
    .orderBy(asc(models.code), asc(finishes.name), asc(items.createdAt));
  const groups = new Map<string, LacquerGroup>();
  for (const r of rows) {
    const key = `${r.modelId}|${r.finishId}`;
    const g = groups.get(key) ?? { modelId: r.modelId, model: r.model, modelName: r.modelName, finishId: r.finishId, colour: r.colour, cabinets: [] };
    g.cabinets.push(r.identity);
    groups.set(key, g);
  }
  return [...groups.values()];
}

export interface SetGroup {
  /** tweeter | midrange | bass, or "crossover" for sets of boards. */
  partType: string;
  sets: { code: string; model: string | null; left: string | null; right: string | null; maxDiffDb: number; limitDb: number }[];
}

/** The matched sets reserved and not yet fitted, grouped by part type (boards last). */
export async function reservedSets(db: DbOrTx): Promise<SetGroup[]> {
  const sets = await openSets(db);
  const order = ["tweeter", "midrange", "bass", "crossover"];
  const groups = new Map<string, SetGroup>();
  for (const s of sets) {
    const type = s.partType ?? "crossover";
    const g = groups.get(type) ?? { partType: type, sets: [] };
    g.sets.push({ code: s.code, model: s.model, left: s.L ?? null, right: s.R ?? null, maxDiffDb: s.maxDiffDb, limitDb: s.limitDb });
    groups.set(type, g);
  }
  return [...groups.values()].sort((a, b) => order.indexOf(a.partType) - order.indexOf(b.partType));
}
