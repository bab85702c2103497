/** A service case's moves from state to state, each one an event. */
import "server-only";
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { serviceCases, type ServiceCase } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { appendEvent } from "@/lib/events/queries";
import type { Actor } from "@/lib/vocabulary/actor";
import { canMove, CASE_STATE_WORDS, type CaseState } from "@/lib/vocabulary/case-states";

export const SERVICE_STATION = "service" as const;

/**
 * Moves the case to `to` and appends its "case.moved" event, in the caller's transaction (or one
 * of its own). Refused with 409 and the desk's words when the case is not where the move starts
 * (it moved meanwhile) or the move is not one of CASE_TRANSITIONS; the database's trigger holds
 * the same table, so nothing else can move it otherwise. Returns the case as moved, with the id
 * of its "case.moved" event (an owner message is linked to it).
 */
export async function moveCase(
  db: DbOrTx,
  input: { caseId: string; from?: CaseState; to: CaseState; reason?: string | null; data?: Record<string, unknown> },
  actor: Actor | { id: null },
): Promise<ServiceCase & { moveEventId: number }> {
  const work = async (tx: DbOrTx) => {
    const [row] = await tx.select().from(serviceCases).where(eq(serviceCases.id, input.caseId));
    if (!row) throw new AppError(404, "No such service case.");
    if (input.from && row.state !== input.from) {
      throw new AppError(409, `This case is now “${CASE_STATE_WORDS[row.state]}”, not “${CASE_STATE_WORDS[input.from]}”: it was moved meanwhile. Nothing was changed.`);
    }
    if (!canMove(row.state, input.to)) {
      throw new AppError(409, `A case that is “${CASE_STATE_WORDS[row.state]}” cannot become “${CASE_STATE_WORDS[input.to]}”. Nothing was changed.`);
    }
    await tx.update(serviceCases).set({ state: input.to }).where(eq(serviceCases.id, row.id));
    const moveEventId = await appendEvent(tx, {
      actorId: actor.id,
      station: SERVICE_STATION,
      type: "case.moved",
      subjectKind: "case",
      subjectId: row.id,
      data: { code: row.code, from: row.state, to: input.to, ...(input.data ?? {}) },
      reason: input.reason ?? null,
    });
    return { ...row, state: input.to, moveEventId };
  };
  return "rollback" in db ? work(db) : db.transaction(work);
}
