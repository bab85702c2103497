/**
 * The repair of a service case: the failed part comes out and the reserved one goes in, as link
 * events of the genealogy (so the trace "as built" still shows the original and "now" the
 * replacement), the removed part gets its disposition, and the reservation ends as fitted.
 */
import "server-only";
import { and, asc, eq, inArray, isNull } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { caseFindings, caseReservations, events, items, type ServiceCase } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { changeState, fit, removeFrom } from "@/lib/genealogy/graph";
import type { Actor } from "@/lib/vocabulary/actor";
import { CASE_STATE_WORDS } from "@/lib/vocabulary/case-states";
import { positionName } from "@/lib/vocabulary/positions";
import type { Side } from "@/lib/vocabulary/sides";
import { caseByCode, casePlace, partAt, SIDE_WORD, speakerOf } from "./replacements";
import { moveCase, SERVICE_STATION } from "./states";

/** What becomes of the part taken out, and the item state that records it. */
export const DISPOSITIONS = ["failed", "returned_to_maker", "scrapped"] as const;
export type Disposition = (typeof DISPOSITIONS)[number];
export const DISPOSITION_WORDS: Record<Disposition, string> = {
  failed: "Kept as failed (for examination)",
  returned_to_maker: "Returned to its maker",
  scrapped: "Scrapped",
};
export const isDisposition = (v: unknown): v is Disposition => typeof v === "string" && (DISPOSITIONS as readonly string[]).includes(v);

/** A case is repaired while it is diagnosed or its part has come (a case waiting for payment waits). */
const REPAIRING_STATES = ["diagnosed", "waiting_part"] as const;

export interface RepairRow {
  side: Side;
  position: string;
  removed: string;
  fitted: string;
  disposition: string | null;
  reason: string | null;
  at: Date;
}

/**
 * Fits the part reserved for (side, position) of the case in place of the part there now, in one
 * transaction: `removeFrom` (reason given), the removed part's disposition as its state, `fit`,
 * the new part "fitted", the reservation ended as fitted. Only the speaker at that side is
 * touched; the partner speaker is touched only when it has its own reservation at the position
 * (a matched pair for both, reserved together).
 */
export async function fitReplacement(
  db: DbOrTx,
  input: { code: string; side: string; position: string; disposition: string; reason: string },
  actor: Actor,
): Promise<RepairRow> {
  const reason = input.reason.trim();
  const errors: Record<string, string[]> = {};
  if (!isDisposition(input.disposition)) errors.disposition = ["Choose what becomes of the part taken out: failed, returned to its maker or scrapped."];
  if (!reason) errors.reason = ["Say why it comes out (what was found)."];
  else if (reason.length > 500) errors.reason = ["At most 500 characters."];
  if (Object.keys(errors).length) throw new AppError(400, `Nothing was changed: ${Object.values(errors)[0]![0]}`, errors);
  const disposition = input.disposition as Disposition;
  return db.transaction(async (tx) => {
    const place = await casePlace(tx, input);
    const { case: c, side, slot, pair } = place;
    if (!(REPAIRING_STATES as readonly string[]).includes(c.state)) {
      throw new AppError(409, `Case ${c.code} is “${CASE_STATE_WORDS[c.state]}”: a part is fitted while the case is diagnosed or its part has come${c.state === "waiting_payment" ? ", once the payment is in" : ""}.`);
    }
    const [res] = await tx
      .select({ r: caseReservations, item: items })
      .from(caseReservations)
      .innerJoin(items, eq(items.id, caseReservations.itemId))
      .where(and(eq(caseReservations.caseId, c.id), eq(caseReservations.side, side), eq(caseReservations.position, slot.slot), isNull(caseReservations.endedAt)))
      .limit(1);
    const where = `${SIDE_WORD[side]} speaker's ${positionName(slot.slot)}`;
    if (!res) throw new AppError(409, `No part is reserved for the ${where}: reserve one first.`);
    const speaker = await speakerOf(tx, pair.id, side);
    if (!speaker) throw new AppError(409, `${pair.identity} has no ${SIDE_WORD[side]} speaker in the register.`);
    const old = await partAt(tx, speaker.id, slot.slot);
    if (!old) throw new AppError(409, `Nothing sits at the ${where} now.`);
    const at = now();
    const by = { actorId: actor.id, station: SERVICE_STATION, at } as const;
    await removeFrom(tx, { parent: speaker, child: old, data: { replacedBy: res.item.identity, case: c.code } }, { ...by, reason });
    await changeState(tx, old, disposition, { ...by, reason }, { case: c.code, disposition });
    const fitted = await fit(tx, { parent: speaker, child: res.item, position: slot.slot, data: { replaces: old.identity, case: c.code } }, by);
    await changeState(tx, res.item, "fitted", by, { speaker: speaker.identity, position: slot.slot, case: c.code });
    const ended = await tx
      .update(caseReservations)
      .set({ endedAt: at, endEventId: fitted.eventId, endReason: "fitted" })
      .where(and(eq(caseReservations.id, res.r.id), isNull(caseReservations.endedAt)))
      .returning({ id: caseReservations.id });
    if (ended.length !== 1) throw new AppError(409, `${res.item.identity}'s reservation ended a moment ago. Nothing was changed.`);
    return { side, position: slot.slot, removed: old.identity, fitted: res.item.identity, disposition, reason, at };
  });
}

/**
 * The case's repairs, oldest first: each reservation ended as fitted, with the part it replaced
 * and that part's disposition (from the fit's and the removal's events). For the case page.
 */
export async function repairsOfCase(db: DbOrTx, caseId: string): Promise<RepairRow[]> {
  const rows = await db
    .select({ r: caseReservations, serial: items.identity })
    .from(caseReservations)
    .innerJoin(items, eq(items.id, caseReservations.itemId))
    .where(and(eq(caseReservations.caseId, caseId), eq(caseReservations.endReason, "fitted")))
    .orderBy(asc(caseReservations.id));
  if (!rows.length) return [];
  const fits = await db.select({ id: events.id, data: events.data }).from(events).where(inArray(events.id, rows.map((r) => r.r.endEventId!)));
  const removedSerials = fits.map((f) => String((f.data as { replaces?: unknown }).replaces ?? ""));
  const removed = removedSerials.length ? await db.select({ id: items.id, identity: items.identity, state: items.state }).from(items).where(inArray(items.identity, removedSerials)) : [];
  const removals = removed.length
    ? await db
        .select({ subjectId: events.subjectId, reason: events.reason, data: events.data })
        .from(events)
        .where(and(eq(events.type, "item.state_changed"), inArray(events.subjectId, removed.map((r) => r.id))))
        .orderBy(asc(events.id))
    : [];
  return rows.map(({ r, serial }) => {
    const data = (fits.find((f) => f.id === r.endEventId)?.data ?? {}) as { replaces?: string };
    const old = removed.find((x) => x.identity === data.replaces);
    const disp = old ? removals.filter((e) => e.subjectId === old.id && (e.data as { disposition?: unknown }).disposition).at(-1) : undefined;
    return {
      side: r.side,
      position: r.position,
      removed: data.replaces ?? "",
      fitted: serial,
      disposition: disp ? String((disp.data as { disposition: unknown }).disposition) : null,
      reason: disp?.reason ?? null,
      at: r.endedAt!,
    };
  });
}

/** Findings at a part's position (a drive unit or the crossover) that have no repair since they were recorded. */
export async function unrepairedFindings(db: DbOrTx, c: ServiceCase) {
  const findings = await db.select().from(caseFindings).where(eq(caseFindings.caseId, c.id)).orderBy(asc(caseFindings.id));
  const repairs = await repairsOfCase(db, c.id);
  return {
    findings,
    open: findings.filter((f) => !repairs.some((r) => r.side === f.side && r.position === f.position && r.at >= f.createdAt)),
  };
}

/**
 * Moves the case to "repaired" when every finding has its repair (a part fitted at its side and
 * position after it was found); refused with the list of what is still open otherwise.
 */
export async function markRepaired(db: DbOrTx, input: { code: string }, actor: Actor): Promise<ServiceCase> {
  return db.transaction(async (tx) => {
    const c = await caseByCode(tx, input.code);
    if (!c) throw new AppError(404, `There is no service case ${input.code}.`);
    const { findings, open } = await unrepairedFindings(tx, c);
    if (!findings.length) throw new AppError(409, `Case ${c.code} has no finding yet: record the diagnosis, then the repair.`);
    if (open.length) {
      const list = open.map((f) => `the ${SIDE_WORD[f.side]} speaker's ${positionName(f.position)}`).join(", ");
      throw new AppError(409, `Not every finding has its repair yet: ${list}. Fit a replacement there first.`);
    }
    const repairs = await repairsOfCase(tx, c.id);
    return moveCase(tx, { caseId: c.id, to: "repaired", data: { replaced: repairs.map((r) => ({ side: r.side, position: r.position, removed: r.removed, fitted: r.fitted })) } }, actor);
  });
}
