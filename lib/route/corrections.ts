/**
 * Correcting a mistyped route reading. The record stays as it was written; a correction is
 * appended beside it (route_corrections, refused any change by the database) with the readings as
 * they should have been, the reason and who made it, and an event per cabinet that names the
 * event it corrects (`correctsId`, which the EPCIS export turns into an errorDeclaration). The
 * newest correction of a record is what the route reads from then on.
 *
 * The window check runs again on the corrected values: a value now outside its window is asked
 * about as recordStep asks, and recorded opens a nonconformance; a correction that brings every
 * reading of a record back inside leaves that record's open nonconformance to quality, who close
 * it as an entry error (dispositionNc, disposition "entry_error").
 */
import "server-only";
import { and, asc, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { events, items, nonconformances, processSpecs, routeCorrections, routeRecords, users } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { now as clockNow } from "@/lib/clock";
import { formatShopTime } from "@/lib/format";
import { appendEvent } from "@/lib/events/queries";
import type { Actor } from "@/lib/vocabulary/actor";
import { nextNcCode } from "./nc-codes";
import { OutOfWindowUnconfirmed } from "./pair-route";
import { checkReadings, FUTURE_TOLERANCE_MS, outOfWindowConfirmation, readingValueText } from "./rules";
import type { ReadingValue, StepSpec } from "./types";
import { correctedRecords } from "./corrected";
import { checkLots, refitLots } from "./lacquer-lots";

export { correctedRecords, withCorrections } from "./corrected";

/** The longest reason a correction takes. */
export const CORRECTION_REASON_MAX = 500;

/** What the person correcting may do: correct any record (quality), or their own (the cabinet shop). */
export interface Corrector extends Actor {
  mayCorrectAny: boolean;
  mayCorrectOwn: boolean;
}

export interface CorrectionShown {
  id: number;
  recordId: number;
  /** The readings before this correction (the record's, or the previous correction's). */
  before: Record<string, ReadingValue>;
  beforeStartedAt: Date;
  readings: Record<string, ReadingValue>;
  startedAt: Date;
  changed: string[];
  reason: string;
  by: string;
  at: Date;
}

/** Every correction of a pair's records, oldest first, each with what it replaced and who made it. */
export async function correctionsOf(db: DbOrTx, pairId: string): Promise<CorrectionShown[]> {
  const rows = await db
    .select({ c: routeCorrections, by: users.name, original: routeRecords.readings, originalStart: routeRecords.startedAt })
    .from(routeCorrections)
    .innerJoin(routeRecords, eq(routeRecords.id, routeCorrections.recordId))
    .leftJoin(users, eq(users.id, routeCorrections.correctedBy))
    .where(eq(routeCorrections.pairId, pairId))
    .orderBy(asc(routeCorrections.id));
  const last = new Map<number, { readings: Record<string, ReadingValue>; startedAt: Date }>();
  return rows.map(({ c, by, original, originalStart }) => {
    const before = last.get(c.recordId) ?? { readings: original, startedAt: originalStart };
    last.set(c.recordId, { readings: c.readings, startedAt: c.startedAt });
    return { id: c.id, recordId: c.recordId, before: before.readings, beforeStartedAt: before.startedAt, readings: c.readings, startedAt: c.startedAt, changed: c.changed, reason: c.reason, by: by ?? "someone", at: c.correctedAt };
  });
}

/** A value as the correction form shows it for editing: "240" for P240, "pass"/"fail" for a check. */
function asTyped(v: ReadingValue | undefined): string | boolean | undefined {
  if (v === undefined) return undefined;
  return typeof v === "number" ? String(v) : v;
}

export interface CorrectInput {
  pairId: string;
  recordId: number;
  /** The readings as they should read; a reading left out keeps its value. */
  readings: Record<string, string | boolean | undefined>;
  /** When the step really started, where that was mistyped; left out, it keeps its start. */
  startedAt?: Date | null;
  /** The same as minutes before the record was made (the correction form's field); `startedAt` wins. */
  startedMinutesBefore?: number | null;
  reason: string;
  confirmOutOfWindow?: string | null;
}

export interface CorrectResult {
  correctionId: number;
  /** The nonconformance the correction opened (a value now outside its window). */
  opened: string | null;
  /** The open nonconformance of this record that quality may now close as an entry error. */
  entryError: string | null;
}

/**
 * Appends a correction of one route record. Refuses, writing nothing: an unknown record (or one of
 * another pair), a person who neither holds quality's permission nor recorded it, no reason, a
 * reading that is not a number or a P-grade (as recordStep does), a start in the future or after
 * the record was made, and a correction that changes nothing. A value that the correction brings
 * outside its window is asked about first (OutOfWindowUnconfirmed, as recordStep does).
 */
export async function correctRecord(db: DbOrTx, input: CorrectInput, actor: Corrector): Promise<CorrectResult> {
  return db.transaction(async (tx) => {
    const at = clockNow();
    const [record] = await tx.select().from(routeRecords).where(and(eq(routeRecords.id, input.recordId), eq(routeRecords.pairId, input.pairId))).limit(1);
    if (!record) throw new AppError(404, "That step record is not in this pair's route. Reload the page and choose the record again.", { recordId: ["Choose a recorded step of this pair."] });
    const [first] = await tx.select({ actorId: events.actorId }).from(events).where(eq(events.id, record.eventId)).limit(1);
    const own = first?.actorId === actor.id;
    if (!actor.mayCorrectAny && !(own && actor.mayCorrectOwn)) {
      throw new AppError(403, "A reading is corrected by the person who recorded it, or by quality.");
    }
    const reason = input.reason.trim().replace(/\s+/g, " ");
    if (reason.length < 5) throw new AppError(400, "Say why the reading is corrected, e.g. “typed 1000 for 100”.", { reason: ["Give the reason (at least a few words)."] });
    if (reason.length > CORRECTION_REASON_MAX) throw new AppError(400, `Keep the reason under ${CORRECTION_REASON_MAX} characters.`, { reason: [`At most ${CORRECTION_REASON_MAX} characters.`] });

    const [spec] = await tx.select({ steps: processSpecs.steps }).from(processSpecs).where(eq(processSpecs.id, record.specId)).limit(1);
    const step = spec?.steps.find((s) => s.seq === record.seq);
    if (!step) throw new AppError(409, "The route version of that record has no such step: it cannot be corrected here.");
    const cur = (await correctedRecords(tx, record.pairId, [record]))[0]!;

    // The readings as they should read: the ones typed, the others as they stand.
    const raw: Record<string, string | boolean | undefined> = {};
    for (const r of step.readings) raw[r.key] = input.readings[r.key] !== undefined && input.readings[r.key] !== "" ? input.readings[r.key] : asTyped(cur.readings[r.key]);
    const checked = checkReadings(step, raw);
    if (!checked.ok) throw new AppError(400, "Some readings need attention.", checked.fieldErrors);

    const startedAt = input.startedAt ?? (input.startedMinutesBefore != null ? new Date(record.recordedAt.getTime() - input.startedMinutesBefore * 60_000) : cur.startedAt);
    if (Number.isNaN(startedAt.getTime())) throw new AppError(400, "Enter when the step started.", { startedAt: ["Enter a time."] });
    if (startedAt.getTime() > record.recordedAt.getTime() + FUTURE_TOLERANCE_MS || startedAt.getTime() > at.getTime() + FUTURE_TOLERANCE_MS) {
      throw new AppError(400, "A step starts before it is recorded: enter the time it really started.", { startedAt: ["At or before the time it was recorded."] });
    }
    const changed = step.readings.filter((r) => checked.values[r.key] !== cur.readings[r.key]).map((r) => r.key);
    if (startedAt.getTime() !== cur.startedAt.getTime()) changed.push("startedAt");
    if (!changed.length) throw new AppError(400, "Nothing changed: type the value as it should have been.", { readings: ["Change at least one reading."] });

    const out = checked.outOfWindow;
    const confirmation = outOfWindowConfirmation(out);
    if (out.length && input.confirmOutOfWindow !== confirmation) throw new OutOfWindowUnconfirmed(out, confirmation);

    await checkLots(tx, step, checked.values);
    const [pair] = await tx.select().from(items).where(eq(items.id, record.pairId)).limit(1);
    const openNc = (await tx.select().from(nonconformances).where(and(eq(nonconformances.recordId, record.id), isNull(nonconformances.disposition))).orderBy(asc(nonconformances.openedAt)))[0] ?? null;

    // The events each cabinet's correction corrects: its newest event about this record.
    const cabinetIds = record.cabinets.map((c) => c.id);
    const originals = await tx
      .select({ id: events.id, subjectId: events.subjectId })
      .from(events)
      .where(and(eq(events.type, "route.step_recorded"), inArray(events.subjectId, cabinetIds), sql`${events.id} >= ${record.eventId}`, sql`${events.id} < ${record.eventId} + ${cabinetIds.length}`));
    const earlier = await tx
      .select({ id: events.id, subjectId: events.subjectId })
      .from(events)
      .where(and(eq(events.type, "route.step_corrected"), inArray(events.subjectId, cabinetIds), sql`json_extract(${events.data}, '$.recordId') = ${record.id}`))
      .orderBy(desc(events.id));
    const words = changedWords(step, changed, cur.readings, checked.values, cur.startedAt, startedAt);
    let firstEvent = 0;
    for (const c of record.cabinets) {
      const corrects = earlier.find((e) => e.subjectId === c.id)?.id ?? originals.find((e) => e.subjectId === c.id)?.id ?? null;
      const [cab] = await tx.select({ identity: items.identity }).from(items).where(eq(items.id, c.id)).limit(1);
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station: step.station,
        type: "route.step_corrected",
        subjectKind: "item",
        subjectId: c.id,
        data: { identity: cab?.identity ?? null, pair: pair!.identity, recordId: record.id, seq: step.seq, step: step.name, side: c.side, readings: checked.values, changed, changedWords: words, outOfWindow: out.map((o) => o.key), startedAt: startedAt.toISOString() },
        reason,
        correctsId: corrects,
      });
      firstEvent ||= eventId;
    }
    const [row] = await tx
      .insert(routeCorrections)
      .values({ recordId: record.id, pairId: record.pairId, readings: checked.values, changed, startedAt, outOfWindow: out.length > 0, reason, correctedBy: actor.id, correctedAt: at, eventId: firstEvent })
      .returning({ id: routeCorrections.id });

    const cabinetItems = await tx.select().from(items).where(inArray(items.id, cabinetIds));
    await refitLots(tx, step, cur.readings, checked.values, cabinetItems, { actorId: actor.id, station: step.station, reason });

    let opened: string | null = null;
    if (out.length && !openNc) {
      opened = await nextNcCode(tx, at);
      const finding = out.map((o) => `${o.label} ${readingValueText(step.readings.find((r) => r.key === o.key), o.value)} (window ${o.window})`).join("; ") + ", after a correction";
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station: step.station,
        type: "nc.opened",
        subjectKind: "item",
        subjectId: pair!.id,
        data: { identity: pair!.identity, code: opened, step: step.name, seq: step.seq, finding, sides: record.cabinets.map((c) => c.side), correction: row!.id },
      });
      await tx.insert(nonconformances).values({ id: newId(), code: opened, pairId: pair!.id, recordId: record.id, cabinets: record.cabinets, seq: step.seq, finding, openedAt: at, openedEventId: eventId });
    }
    return { correctionId: row!.id, opened, entryError: !out.length && openNc ? openNc.code : null };
  });
}

/** "Wet film thickness 1000 µm → 100 µm; started 09:10 → 09:00" for the event log. */
function changedWords(step: StepSpec, changed: string[], before: Record<string, ReadingValue>, after: Record<string, ReadingValue>, startBefore: Date, startAfter: Date): string {
  return changed
    .map((k) => {
      if (k === "startedAt") return `start ${formatShopTime(startBefore, startAfter)} → ${formatShopTime(startAfter, startAfter, { zone: true })}`;
      const spec = step.readings.find((r) => r.key === k);
      const b = before[k];
      return `${spec?.label ?? k} ${b === undefined ? "none" : readingValueText(spec, b)} → ${readingValueText(spec, after[k]!)}`;
    })
    .join("; ");
}

/**
 * Whether a nonconformance may be closed as an entry error: it came from a route record, and that
 * record's newest correction, made after the nonconformance opened, has every reading inside its
 * window. Returns the refusal in words, or null when it may.
 */
export async function entryErrorRefusal(db: DbOrTx, nc: { code: string; recordId: number | null; openedAt: Date }): Promise<string | null> {
  const refusal = `${nc.code} closes as an entry error only once a correction of its record has brought every reading back inside its window.`;
  if (nc.recordId === null) return refusal;
  const [newest] = await db.select().from(routeCorrections).where(eq(routeCorrections.recordId, nc.recordId)).orderBy(desc(routeCorrections.id)).limit(1);
  if (!newest || newest.outOfWindow || newest.correctedAt.getTime() < nc.openedAt.getTime()) return refusal;
  return null;
}

/**
 * Of these nonconformances, the ones quality may close as an entry error now, with the correction
 * that put the reading right in words ("Wet film thickness 1000 µm → 100 µm"): one query.
 */
export async function entryErrorsReady(db: DbOrTx, ncs: { id: string; recordId: number | null; openedAt: Date }[]): Promise<Map<string, { words: string; reason: string }>> {
  const recordIds = [...new Set(ncs.map((n) => n.recordId).filter((r): r is number => r !== null))];
  const out = new Map<string, { words: string; reason: string }>();
  if (!recordIds.length) return out;
  const rows = await db
    .select({ c: routeCorrections, words: sql<string | null>`json_extract(${events.data}, '$.changedWords')` })
    .from(routeCorrections)
    .innerJoin(events, eq(events.id, routeCorrections.eventId))
    .where(inArray(routeCorrections.recordId, recordIds))
    .orderBy(asc(routeCorrections.id));
  const newest = new Map<number, (typeof rows)[number]>();
  for (const r of rows) newest.set(r.c.recordId, r);
  for (const n of ncs) {
    const c = n.recordId !== null ? newest.get(n.recordId) : undefined;
    if (c && !c.c.outOfWindow && c.c.correctedAt.getTime() >= n.openedAt.getTime()) out.set(n.id, { words: c.words ?? "", reason: c.c.reason });
  }
  return out;
}

/** Who recorded each route record (the actor of its first event), for "correct your own". */
export async function recordAuthors(db: DbOrTx, eventIds: number[]): Promise<Map<number, string | null>> {
  if (!eventIds.length) return new Map();
  const rows = await db.select({ id: events.id, actorId: events.actorId }).from(events).where(inArray(events.id, eventIds));
  return new Map(rows.map((r) => [r.id, r.actorId]));
}
