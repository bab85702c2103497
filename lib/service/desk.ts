/** What the desk does to an open case: findings, moves (with their owner messages), photos. */
import "server-only";
import { currentQuote } from "@/lib/payments/quotes";
import { refundForCancelledCase } from "@/lib/payments/refunds";
import { releaseAllOfCase } from "./replacements";
import type { DbOrTx } from "@/db";
import { caseFindings, type CaseFinding, type Quote, type ServiceCase } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { ownerById } from "@/lib/owners";
import { storeUploads, type UploadFile } from "@/lib/uploads";
import type { Actor } from "@/lib/vocabulary/actor";
import { CASE_STATE_WORDS, canMove, type CaseState } from "@/lib/vocabulary/case-states";
import { CROSSOVER_POSITION } from "@/lib/vocabulary/positions";
import { ownerMailData, ownerMailOutcome, queueOwnerMessage, type CaseMessageKind, type OwnerQuote } from "./messages";
import { caseByCode, caseParticulars, findingsOf, warrantyFacts } from "./queries";
import { moveCase, SERVICE_STATION } from "./states";

/** States in which the diagnosis may still be added to. */
export const FINDING_STATES: readonly CaseState[] = ["received", "diagnosed", "waiting_part", "waiting_payment"];

/**
 * Moves the desk makes from the case page. The others are made where their work is recorded:
 * "repaired" by the repair (lib/service replace page), "tested" by the re-test, "sent back" by the
 * return shipment; those pages call `moveCase` and, for "sent back", `queueOwnerMessage`.
 */
export const DESK_MOVES: readonly CaseState[] = ["diagnosed", "waiting_part", "waiting_payment", "closed", "cancelled"];

/** The owner message a move sends, if any. */
export const MOVE_MESSAGE: Partial<Record<CaseState, CaseMessageKind>> = { diagnosed: "diagnosis", sent_back: "on_its_way", closed: "closed" };

async function openCaseOrRefuse(db: DbOrTx, code: string): Promise<ServiceCase> {
  const c = await caseByCode(db, code);
  if (!c) throw new AppError(404, `There is no service case ${code}.`);
  return c;
}

/**
 * Records a finding at one side and position: the side must be a speaker that came back, the
 * position one of the model's (or "XO", the crossover). Appends the row and its event.
 */
export async function recordFinding(db: DbOrTx, input: { code: string; side: string; position: string; finding: string }, actor: Actor): Promise<CaseFinding> {
  const c = await openCaseOrRefuse(db, input.code);
  if (!FINDING_STATES.includes(c.state)) throw new AppError(409, `Case ${c.code} is “${CASE_STATE_WORDS[c.state]}”: findings are recorded before the repair.`);
  const p = await caseParticulars(db, c);
  const finding = input.finding.trim().replace(/\s+/g, " ");
  const errors: Record<string, string[]> = {};
  if (input.side !== "L" && input.side !== "R") errors.side = ["Choose the left or the right speaker."];
  else if (p.item.kind === "speaker" && p.item.side !== input.side) errors.side = [`Only the ${p.item.side === "L" ? "left" : "right"} speaker came back in this case; the other is still with the owner.`];
  const positions = [...(p.model?.positions.map((x) => x.position) ?? []), CROSSOVER_POSITION];
  if (!positions.includes(input.position)) errors.position = [`Choose one of the model's positions: ${positions.join(", ")}.`];
  if (!finding) errors.finding = ["Say what was found, e.g. “no output above 3 kHz”."];
  else if (finding.length > 500) errors.finding = ["Keep the finding to 500 characters."];
  if (Object.keys(errors).length) throw new AppError(400, Object.values(errors)[0]![0]!, errors);
  return db.transaction(async (tx) => {
    const at = now();
    const eventId = await appendEvent(tx, {
      actorId: actor.id,
      station: SERVICE_STATION,
      type: "case.finding_recorded",
      subjectKind: "case",
      subjectId: c.id,
      data: { code: c.code, side: input.side, position: input.position, finding },
      at,
    });
    const [row] = await tx.insert(caseFindings).values({ caseId: c.id, side: input.side as "L" | "R", position: input.position, finding, eventId, createdAt: at }).returning();
    return row!;
  });
}

/** A recorded quote as the owner's message shows it: one amount per line. */
function ownerQuoteOf(q: Quote | null): OwnerQuote | null {
  return q ? { lines: q.lines.map((l) => ({ description: l.quantity > 1 ? `${l.description} × ${l.quantity}` : l.description, amountMinor: l.quantity * l.unitMinor })), totalMinor: q.totalMinor, currency: q.currency } : null;
}

/**
 * A move made at the desk, with the desk's rules on top of the state table: a case is diagnosed
 * only with a finding; a cancellation, and a step back to "diagnosed", need a reason. The owner's
 * message for the move goes in the same transaction (or the case records why none was sent).
 * `quote` goes with a diagnosis of a speaker out of warranty.
 */
export async function changeCaseState(
  db: DbOrTx,
  input: { code: string; from?: CaseState; to: CaseState; reason?: string | null; quote?: OwnerQuote | null },
  actor: Actor,
): Promise<ServiceCase & { moveEventId: number }> {
  const c = await openCaseOrRefuse(db, input.code);
  if (!DESK_MOVES.includes(input.to)) throw new AppError(409, `“${CASE_STATE_WORDS[input.to]}” is recorded on its own page, with the work it stands for.`);
  if (!canMove(c.state, input.to)) throw new AppError(409, `A case that is “${CASE_STATE_WORDS[c.state]}” cannot become “${CASE_STATE_WORDS[input.to]}”. Nothing was changed.`);
  const reason = input.reason?.trim().replace(/\s+/g, " ") || null;
  if (reason && reason.length > 500) throw new AppError(400, "Keep the reason to 500 characters.", { reason: ["Keep the reason to 500 characters."] });
  if (input.to === "cancelled" && !reason) throw new AppError(400, "Say why the case is cancelled.", { reason: ["Say why the case is cancelled."] });
  if (input.to === "diagnosed" && c.state !== "received" && !reason) throw new AppError(400, "Say why the case goes back to diagnosed.", { reason: ["Say why the case goes back to diagnosed."] });
  if (input.to === "waiting_payment" && (await warrantyFacts(db, c))?.inWarranty !== false) {
    throw new AppError(409, "This repair is not charged (in warranty, or the warranty cannot be worked out), so the case does not wait for payment. Nothing was changed.");
  }
  if (input.to === "diagnosed" && (await findingsOf(db, c.id)).length === 0) {
    throw new AppError(409, "Record at least one finding (a failed position and what was found) before the case is diagnosed.", { finding: ["Record at least one finding first."] });
  }
  // The diagnosis message goes once, when the case is first diagnosed.
  const kind = input.to === "diagnosed" && c.state !== "received" ? undefined : MOVE_MESSAGE[input.to];
  const owner = kind && c.ownerId ? await ownerById(db, c.ownerId) : null;
  const outcome = kind ? ownerMailOutcome(owner) : null;
  const warranty = kind === "diagnosis" ? await warrantyFacts(db, c) : null;
  // Out of warranty, the diagnosis carries the quote made before it (the link to pay follows).
  const quote = input.quote ?? (warranty && !warranty.inWarranty ? ownerQuoteOf(await currentQuote(db, c.id)) : null);
  const moved = await db.transaction(async (tx) => {
    const moved = await moveCase(tx, { caseId: c.id, from: input.from ?? c.state, to: input.to, reason, data: kind && outcome ? ownerMailData(kind, outcome) : undefined }, actor);
    if (kind) {
      await queueOwnerMessage(tx, { case: moved, kind, eventId: moved.moveEventId, inWarranty: warranty?.inWarranty, quote });
    }
    // A cancelled case gives back the stock it held, in the same step.
    if (input.to === "cancelled") await releaseAllOfCase(tx, c.id, actor);
    return moved;
  });
  // A case cancelled after the owner paid is refunded through the payment service, once the
  // cancel is on record; should the service refuse, its words are shown and the payment stays on
  // record unrefunded (refundForCancelledCase refunds only what has no refund yet).
  if (input.to === "cancelled") {
    try {
      await refundForCancelledCase(db, c.id, actor);
    } catch (e) {
      if (!(e instanceof AppError)) throw e;
      throw new AppError(
        502,
        `Case ${c.code} is cancelled, but the owner's payment is not refunded yet: the payment service did not answer as expected. Try the refund again from the case's quote and payment page.`,
      );
    }
  }
  return moved;
}

/** Photos of what came back, through lib/uploads (all checked before any is kept), each with its event. */
export async function addCasePhotos(db: DbOrTx, input: { code: string; files: UploadFile[]; caption?: string }, actor: Actor) {
  const c = await openCaseOrRefuse(db, input.code);
  const rows = await storeUploads(db, input.files, { subject: { kind: "case", id: c.id }, purpose: "photo", accept: "image", caption: input.caption, actorId: actor.id, station: SERVICE_STATION });
  await db.transaction(async (tx) => {
    for (const r of rows) {
      await appendEvent(tx, { actorId: actor.id, station: SERVICE_STATION, type: "case.file_added", subjectKind: "case", subjectId: c.id, data: { code: c.code, name: r.originalName, uploadId: r.id } });
    }
  });
  return rows;
}

