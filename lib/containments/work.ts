import "server-only";
import { and, eq, inArray, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { containmentItems, containments, type Containment, type ContainmentItem } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { openCase } from "@/lib/service/intake";
import { openCaseOfPair } from "@/lib/service/queries";
import type { Actor } from "@/lib/vocabulary/actor";
import {
  AFFECTED_ACTION_WORDS,
  AFFECTED_ACTIONS,
  AFFECTED_STATE_WORDS,
  AFFECTED_STATES,
  canMoveAffected,
  GROUP_LABEL,
  isDispositioned,
  RELEASED_STATES,
  type AffectedAction,
  type AffectedGroup,
} from "@/lib/vocabulary/containments";
import { normaliseContainmentCode } from "./code";
import { QUALITY_STATION } from "./raise";

const refuse = (status: number, field: string, message: string): never => {
  throw new AppError(status, message, { [field]: [message] });
};

/** A containment by its code (typed forgivingly), or a 404 in words. */
export async function containmentOrRefuse(db: DbOrTx, codeText: string): Promise<Containment> {
  const code = normaliseContainmentCode(String(codeText ?? ""));
  const [row] = code ? await db.select().from(containments).where(eq(containments.code, code)).limit(1) : [];
  if (!row) throw new AppError(404, `There is no containment ${String(codeText ?? "").slice(0, 40) || "with that code"}.`);
  return row;
}

function openOrRefuse(c: Containment): void {
  if (c.closedAt) throw new AppError(409, `Containment ${c.code} is closed: its serials can no longer change. Nothing was changed.`);
}

export interface MoveInput {
  code: string;
  /** The affected serials to act on, by identity… */
  serials?: readonly string[];
  /** …or every serial of this group that can take the step, shown on the page or not. */
  wholeGroup?: AffectedGroup;
  to: unknown;
  /** What was found or done; required for a failed inspection and for a replacement. */
  note?: unknown;
}

export interface MoveResult {
  moved: { identity: string; from: string; to: AffectedAction; caseCode: string | null }[];
}

/**
 * Moves affected serials on: inspected (passed or failed), cleared, or replaced. Every serial is
 * checked first and nothing is written when one of them cannot move. Each move is an event about
 * the serial; a clearance or a replacement releases the hold ("containment.released"). A failed
 * inspection of a shipped serial opens a service case for it (or joins its pair's open case).
 */
export async function moveAffected(db: DbOrTx, input: MoveInput, actor: Actor): Promise<MoveResult> {
  const c = await containmentOrRefuse(db, input.code);
  openOrRefuse(c);
  const to = input.to as AffectedAction;
  if (!AFFECTED_ACTIONS.includes(to)) refuse(400, "to", `Choose what was done: ${AFFECTED_ACTIONS.map((a) => AFFECTED_ACTION_WORDS[a].toLowerCase()).join(", ")}.`);
  const note = typeof input.note === "string" ? input.note.trim().replace(/\s+/g, " ") : "";
  if (note.length > 1000) refuse(400, "note", "Keep the note to 1000 characters.");
  if ((to === "failed" || to === "replaced") && !note) {
    refuse(400, "note", to === "failed" ? "Say what the inspection found." : "Say what replaced it (the new part or serial).");
  }
  const wanted = [...new Set((input.serials ?? []).map((s) => String(s).trim().toUpperCase()).filter(Boolean))];
  if (!input.wholeGroup && wanted.length === 0) refuse(400, "serials", "Choose at least one affected serial.");
  if (wanted.length > 10_000) refuse(400, "serials", "Act on at most 10,000 serials at once.");

  const run = async (tx: DbOrTx): Promise<MoveResult> => {
    const rows: ContainmentItem[] = [];
    if (input.wholeGroup) {
      const group = input.wholeGroup;
      const from = AFFECTED_STATES.filter((s) => canMoveAffected(s, to));
      rows.push(...(await tx.select().from(containmentItems).where(and(eq(containmentItems.containmentId, c.id), eq(containmentItems.group, group), inArray(containmentItems.state, from)))));
      if (rows.length === 0) refuse(409, "to", `No serial ${GROUP_LABEL[group].toLowerCase()} can become “${AFFECTED_STATE_WORDS[to]}” now. Nothing was changed.`);
    }
    for (let i = 0; !input.wholeGroup && i < wanted.length; i += 500) {
      rows.push(...(await tx.select().from(containmentItems).where(and(eq(containmentItems.containmentId, c.id), inArray(sql`upper(${containmentItems.identity})`, wanted.slice(i, i + 500))))));
    }
    const found = new Set(rows.map((r) => r.identity.toUpperCase()));
    const missing = input.wholeGroup ? [] : wanted.filter((w) => !found.has(w));
    if (missing.length) refuse(404, "serials", `${missing.slice(0, 5).join(", ")}${missing.length > 5 ? ` and ${missing.length - 5} more` : ""} ${missing.length === 1 ? "is" : "are"} not affected by containment ${c.code}.`);
    const stuck = rows.filter((r) => !canMoveAffected(r.state, to));
    if (stuck.length) {
      const r = stuck[0]!;
      refuse(409, "to", `${r.identity} is “${AFFECTED_STATE_WORDS[r.state]}”, so it cannot become “${AFFECTED_STATE_WORDS[to]}”${stuck.length > 1 ? ` (nor can ${stuck.length - 1} more of those chosen)` : ""}. Nothing was changed.`);
    }
    const moved: MoveResult["moved"] = [];
    for (const r of rows.sort((a, b) => a.identity.localeCompare(b.identity))) {
      let caseId: string | null = null;
      let caseCode: string | null = null;
      // A shipped serial that fails is the service desk's from here: its case is opened now.
      if (to === "failed" && r.group === "shipped" && r.pairId) {
        const open = await openCaseOfPair(tx, r.pairId);
        if (open) {
          caseId = open.id;
          caseCode = open.code;
        } else {
          const opened = await openCase(tx, { serial: r.identity, returnedBy: "dealer", symptom: `Containment ${c.code}: failed inspection. ${note}` }, actor);
          caseId = opened.case.id;
          caseCode = opened.case.code;
        }
      }
      const released = RELEASED_STATES.includes(to);
      const eventId = await appendEvent(tx, {
        actorId: actor.id,
        station: QUALITY_STATION,
        type: released ? "containment.released" : "containment.inspected",
        subjectKind: "item",
        subjectId: r.itemId,
        data: { code: c.code, serial: r.identity, from: r.state, to, ...(released ? {} : { result: to }), ...(caseCode ? { case: caseCode } : {}) },
        reason: note || null,
      });
      await tx
        .update(containmentItems)
        .set({ state: to, eventId, ...(caseId ? { caseId } : {}) })
        .where(eq(containmentItems.id, r.id));
      moved.push({ identity: r.identity, from: r.state, to, caseCode });
    }
    return { moved };
  };
  return "rollback" in db ? run(db) : db.transaction(run);
}

/**
 * Closes a containment once every affected serial is dispositioned, with the reason and the
 * approver (the signed-in person who closes it; the trigger of migration 0038 checks the same).
 */
export async function closeContainment(db: DbOrTx, input: { code: string; reason: unknown }, actor: Actor): Promise<Containment> {
  const c = await containmentOrRefuse(db, input.code);
  openOrRefuse(c);
  const reason = typeof input.reason === "string" ? input.reason.trim().replace(/\s+/g, " ") : "";
  if (!reason) refuse(400, "reason", "Say why the containment can close: what was found, and what was done.");
  if (reason.length > 2000) refuse(400, "reason", "Keep the reason to 2000 characters.");
  const rows = await db
    .select({ identity: containmentItems.identity, state: containmentItems.state, caseId: containmentItems.caseId })
    .from(containmentItems)
    .where(eq(containmentItems.containmentId, c.id));
  const open = rows.filter((r) => !isDispositioned(r));
  if (open.length) {
    refuse(
      409,
      "reason",
      `${open.length} of ${rows.length} affected serial${rows.length === 1 ? " is" : "s are"} not dispositioned yet (${open
        .slice(0, 3)
        .map((r) => r.identity)
        .join(", ")}${open.length > 3 ? "…" : ""}): clear, replace or fail each one first. Nothing was changed.`,
    );
  }
  const run = async (tx: DbOrTx) => {
    const at = now();
    const closeEventId = await appendEvent(tx, {
      actorId: actor.id,
      station: QUALITY_STATION,
      type: "containment.closed",
      subjectKind: "containment",
      subjectId: c.id,
      data: { code: c.code, affected: rows.length },
      reason,
      at,
    });
    await tx.update(containments).set({ closedAt: at, closeReason: reason, approvedBy: actor.id, closeEventId }).where(eq(containments.id, c.id));
    const [row] = await tx.select().from(containments).where(eq(containments.id, c.id));
    return row!;
  };
  return "rollback" in db ? run(db) : db.transaction(run);
}
