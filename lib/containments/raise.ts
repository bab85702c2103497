import "server-only";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { containments } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { formatShopTime } from "@/lib/format";
import { readingsAtStation } from "@/lib/route/readings";
import { readWindow } from "@/lib/route/window";
import { search } from "@/lib/search/search";
import { workshopDay } from "@/lib/workshop-time";
import type { Actor } from "@/lib/vocabulary/actor";
import { CONTAINMENT_SEVERITIES, isSeverity, SEVERITY_LABEL, type ContainmentSeverity } from "@/lib/vocabulary/containments";
import { KIND_LABEL, KIND_WORD, isItemKind, type ItemKind } from "@/lib/vocabulary/item-kinds";
import { STATION_NAME, type RouteStation } from "@/lib/vocabulary/stations";
import { affectedByItem, affectedByPairs, type AffectedRow } from "./affected";
import { containmentCode, containmentPrefix } from "./code";

export const QUALITY_STATION = "quality" as const;

/** What a containment may name: a source shared by many parts, or one serialised thing. */
export const TARGET_KINDS: readonly ItemKind[] = ["component_lot", "unit_batch", "maker_lot", "flitch", "supplier_lot", "drive_unit", "crossover", "cabinet", "leaf", "speaker", "pair"];

/** A target as typed on the form or sent as JSON: an identity, or a station and a window. */
export type TargetInput = string | { station?: unknown; from?: unknown; to?: unknown };

export interface RaiseInput {
  target: unknown;
  reason: unknown;
  severity: unknown;
}

export type ResolvedTarget =
  | { type: "item"; itemId: string; kind: ItemKind; identity: string; label: string }
  | { type: "window"; station: RouteStation; from: Date; to: Date; label: string; pairIds: string[] };

const refuse = (status: number, field: string, message: string): never => {
  throw new AppError(status, message, { [field]: [message] });
};

/**
 * Reads a target: an identity (serial, lot, batch, flitch, maker's serial or lot, forgiving case,
 * spaces and hyphens like the search box), or `{ station, from, to }` for every step recorded at a
 * station of the cabinet route in that window. Refuses an unknown target (with "did you mean"), a
 * kind a containment cannot name, and a window in which nothing was recorded.
 */
export async function resolveTarget(db: DbOrTx, target: unknown): Promise<ResolvedTarget> {
  if (target && typeof target === "object" && !Array.isArray(target)) {
    const t = target as { station?: unknown; from?: unknown; to?: unknown };
    const readings = await readingsAtStation(db, { station: t.station, from: t.from, to: t.to });
    const station = readings[0]?.station ?? (String(t.station).trim() as RouteStation);
    const windowText = typeof t.from === "string" && typeof t.to === "string" ? `${t.from.trim()} to ${t.to.trim()}` : "that window";
    if (readings.length === 0) {
      refuse(400, "from", `Nothing was recorded at the ${STATION_NAME[station].toLowerCase()} from ${windowText}, so nothing falls inside this window. Check the dates.`);
    }
    const w = readingsWindow(t);
    const steps = `${readings.length} step${readings.length === 1 ? "" : "s"}`;
    return {
      type: "window",
      station,
      from: w.from,
      to: w.to,
      // Stored for good, so the year is always shown (a "now" in another year forces it).
      label: `${STATION_NAME[station]}: ${steps} recorded between ${formatShopTime(w.from, new Date(0))} and ${formatShopTime(w.to, new Date(0), { zone: true })}`,
      pairIds: [...new Set(readings.map((r) => r.pair.id))],
    };
  }
  const text = typeof target === "string" ? target.trim() : "";
  if (!text) refuse(400, "target", "Name the suspect lot, batch, flitch or serial, or give a station and a time window.");
  if (text.length > 120) refuse(400, "target", "That is too long to be a serial, lot or batch.");
  const answer = await search(db, text, 0);
  if (!answer.exact || answer.exact.type !== "item") {
    const near = answer.didYouMean.flatMap((h) => (h.type === "item" ? [h.identity] : []));
    if (near.length) refuse(404, "target", `There is no ${answer.query} in the register. Did you mean ${near.join(" or ")}?`);
    refuse(404, "target", `There is no lot, batch, flitch or serial ${answer.query || text} in the register. Check the label and try again.`);
  }
  const hit = answer.exact as Extract<NonNullable<typeof answer.exact>, { type: "item" }>;
  const kind = hit.kind as ItemKind;
  if (!isItemKind(hit.kind) || !TARGET_KINDS.includes(kind)) {
    refuse(400, "target", `${hit.identity} is a ${isItemKind(hit.kind) ? KIND_WORD[hit.kind as ItemKind] : hit.kind}: name a lot, a batch, a flitch, or one unit, board, cabinet, speaker or pair.`);
  }
  return { type: "item", itemId: hit.id, kind, identity: hit.identity, label: `${KIND_LABEL[kind]} ${hit.identity}` };
}

// readingsAtStation has checked both ends already; this only turns them into instants again.
function readingsWindow(t: { from?: unknown; to?: unknown }): { from: Date; to: Date } {
  const w = readWindow(t.from, t.to);
  if (!w.ok) throw new AppError(400, w.message, { [w.field]: [w.message] });
  return { from: w.from, to: w.to };
}

/** The serials a resolved target reaches today, grouped by where they are. Writes nothing. */
export function affectedOf(db: DbOrTx, target: ResolvedTarget): Promise<AffectedRow[]> {
  return target.type === "item" ? affectedByItem(db, target.itemId) : affectedByPairs(db, target.pairIds);
}

export function readReason(reason: unknown): string {
  const text = typeof reason === "string" ? reason.trim().replace(/\s+/g, " ") : "";
  if (!text) refuse(400, "reason", "Say why it is suspect: what the supplier reported, or what was found.");
  if (text.length > 2000) refuse(400, "reason", "Keep the reason to 2000 characters.");
  return text;
}

export function readSeverity(severity: unknown): ContainmentSeverity {
  if (!isSeverity(severity)) {
    refuse(400, "severity", `Choose how severe it is: ${CONTAINMENT_SEVERITIES.map((s) => SEVERITY_LABEL[s].toLowerCase()).join(", ")}.`);
  }
  return severity as ContainmentSeverity;
}

export interface Raised {
  id: string;
  code: string;
  affected: AffectedRow[];
}

/**
 * Raises a containment: checks everything first (target, reason, severity, that something is
 * affected), then in one transaction allocates the code, appends the "containment.raised" event and
 * writes the affected list, which is what holds, quarantines and lists each serial from that moment.
 */
export async function raiseContainment(db: DbOrTx, input: RaiseInput, actor: Actor): Promise<Raised> {
  const reason = readReason(input.reason);
  const severity = readSeverity(input.severity);
  const target = await resolveTarget(db, input.target);
  const run = async (tx: DbOrTx): Promise<Raised> => {
    // Read again inside the transaction, so the list is the register as it is when written.
    const affected = await affectedOf(tx, target);
    if (affected.length === 0) {
      refuse(409, "target", `Nothing built, in stock or shipped holds ${target.label} today (its parts may all be scrapped), so there is nothing to contain.`);
    }
    const at = now();
    const prefix = containmentPrefix(workshopDay(at));
    const [last] = await tx.all<{ n: number | null }>(sql`
      SELECT max(CAST(substr(code, ${prefix.length + 1}) AS INTEGER)) AS n FROM containments WHERE code LIKE ${`${prefix}%`}`);
    const code = containmentCode(workshopDay(at), Number(last?.n ?? 0) + 1);
    const id = newId();
    const counts: Record<string, number> = {};
    for (const a of affected) counts[a.group] = (counts[a.group] ?? 0) + 1;
    const eventId = await appendEvent(tx, {
      actorId: actor.id,
      station: QUALITY_STATION,
      type: "containment.raised",
      subjectKind: "containment",
      subjectId: id,
      data: {
        code,
        target: target.label,
        ...(target.type === "item" ? { item: target.identity } : { station: target.station, from: target.from.toISOString(), to: target.to.toISOString() }),
        severity,
        affected: affected.length,
        groups: counts,
      },
      reason,
      at,
    });
    await tx.insert(containments).values({
      id,
      code,
      targetItemId: target.type === "item" ? target.itemId : null,
      targetLabel: target.label,
      station: target.type === "window" ? target.station : null,
      windowFrom: target.type === "window" ? target.from : null,
      windowTo: target.type === "window" ? target.to : null,
      reason,
      severity,
      raisedAt: at,
      raisedBy: actor.id,
      eventId,
    });
    // The whole list in one statement, its rows as one JSON text: binding ten values a row through
    // the driver cost three times as long for a lot held by thousands (npm run bench:trace).
    const list = JSON.stringify(affected.map((a) => [a.itemId, a.kind, a.identity, a.pairId, a.group, a.state, a.dealerId]));
    await tx.run(sql`
      INSERT INTO containment_items (containment_id, item_id, kind, identity, pair_id, "group", item_state, dealer_id, state, event_id)
      SELECT ${id}, j.value ->> 0, j.value ->> 1, j.value ->> 2, j.value ->> 3, j.value ->> 4, j.value ->> 5, j.value ->> 6, 'open', ${eventId}
      FROM json_each(${list}) j ORDER BY j.key`);
    return { id, code, affected };
  };
  return "rollback" in db ? run(db) : db.transaction(run);
}
