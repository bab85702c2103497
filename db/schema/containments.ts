import { sql } from "drizzle-orm";
import { check, index, integer, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { users } from "./auth";
import { events } from "./events";
import { items, owners } from "./genealogy";
import { outbox } from "./mail";
import { serviceCases } from "./service";
import { dealers } from "./workshop";


import { AFFECTED_GROUPS, AFFECTED_STATES, CONTAINMENT_SEVERITIES } from "../../lib/vocabulary/containments";

/**
 * A containment: quality's answer to "this lot (batch, flitch, unit, or what a station did in a
 * window) may be bad". Its target and reason never change; it is open until closed once, with a
 * reason and the approver (triggers of migration 0038 refuse anything else).
 */
export const containments = sqliteTable(
  "containments",
  {
    id: text("id").primaryKey(),
    /** Quality's code, e.g. "CN2612-0003" (lib/containments/code.ts). */
    code: text("code").notNull().unique(),
    /** The suspect item, or null for a station and a time window. */
    targetItemId: text("target_item_id").references(() => items.id),
    /** The target as people read it: an identity, or a station and its window. */
    targetLabel: text("target_label").notNull(),
    station: text("station"),
    windowFrom: integer("window_from", { mode: "timestamp_ms" }),
    windowTo: integer("window_to", { mode: "timestamp_ms" }),
    reason: text("reason").notNull(),
    severity: text("severity", { enum: CONTAINMENT_SEVERITIES }).notNull(),
    raisedAt: integer("raised_at", { mode: "timestamp_ms" }).notNull(),
    raisedBy: text("raised_by")
      .notNull()
      .references(() => users.id),
    /** The "containment.raised" event. */
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    closedAt: integer("closed_at", { mode: "timestamp_ms" }),
    closeReason: text("close_reason"),
    approvedBy: text("approved_by").references(() => users.id),
    closeEventId: integer("close_event_id").references(() => events.id),
  },
  (t) => [
    index("containments_raised_idx").on(t.raisedAt),
    check("containments_target", sql`(${t.targetItemId} IS NOT NULL) OR (${t.station} IS NOT NULL AND ${t.windowFrom} IS NOT NULL AND ${t.windowTo} IS NOT NULL AND ${t.windowTo} >= ${t.windowFrom})`),
    check("containments_reason", sql`length(trim(${t.reason})) BETWEEN 1 AND 2000`),
    check(
      "containments_closed_complete",
      sql`(${t.closedAt} IS NULL) = (${t.closeEventId} IS NULL) AND (${t.closedAt} IS NULL) = (${t.approvedBy} IS NULL) AND (${t.closedAt} IS NULL) = (${t.closeReason} IS NULL)`,
    ),
  ],
);

/**
 * One affected serial of a containment: a pair, a speaker, or a part in stock that holds the target
 * (or fell inside the window), with where it was when the containment was raised. Only `state`,
 * `case_id` and `event_id` move, along lib/vocabulary/containments.ts, each move an event.
 */
export const containmentItems = sqliteTable(
  "containment_items",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    containmentId: text("containment_id")
      .notNull()
      .references(() => containments.id),
    itemId: text("item_id")
      .notNull()
      .references(() => items.id),
    kind: text("kind").notNull(),
    identity: text("identity").notNull(),
    /** The pair it belongs to (itself for a pair), or null for a part in stock. */
    pairId: text("pair_id").references(() => items.id),
    group: text("group", { enum: AFFECTED_GROUPS }).notNull(),
    /** The item's own state when the containment was raised. */
    itemState: text("item_state").notNull(),
    /** The dealer a shipped pair went to. */
    dealerId: text("dealer_id").references(() => dealers.id),
    state: text("state", { enum: AFFECTED_STATES }).notNull().default("open"),
    /** The service case a failed inspection of a shipped serial opened. */
    caseId: text("case_id").references(() => serviceCases.id),
    /** The event of the latest move (the raise's event until the first move). */
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
  },
  (t) => [
    uniqueIndex("containment_items_once").on(t.containmentId, t.itemId),
    index("containment_items_item_idx").on(t.itemId, t.state),
    index("containment_items_group_idx").on(t.containmentId, t.group, t.identity),
    index("containment_items_dealer_idx").on(t.containmentId, t.dealerId),
  ],
);

/** One notice of a containment: to a dealer or to an owner, queued in the outbox once. Appended. */
export const containmentNotices = sqliteTable(
  "containment_notices",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    containmentId: text("containment_id")
      .notNull()
      .references(() => containments.id),
    dealerId: text("dealer_id").references(() => dealers.id),
    ownerId: text("owner_id").references(() => owners.id),
    outboxId: integer("outbox_id")
      .notNull()
      .references(() => outbox.id),
    /** How many affected serials the notice lists. */
    serials: integer("serials").notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [
    check("containment_notices_one_recipient", sql`(${t.dealerId} IS NULL) <> (${t.ownerId} IS NULL)`),
    uniqueIndex("containment_notices_dealer_once").on(t.containmentId, t.dealerId).where(sql`${t.dealerId} IS NOT NULL`),
    uniqueIndex("containment_notices_owner_once").on(t.containmentId, t.ownerId).where(sql`${t.ownerId} IS NOT NULL`),
  ],
);

export type Containment = typeof containments.$inferSelect;
export type ContainmentItem = typeof containmentItems.$inferSelect;
export type ContainmentNotice = typeof containmentNotices.$inferSelect;
