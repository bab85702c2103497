import { sql } from "drizzle-orm";
import { check, index, integer, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { events } from "./events";
import { items } from "./genealogy";
import { serviceCases } from "./service";

/**
 * A replacement part held for a service case: one drive unit or crossover board, for one side and
 * one position of the case's pair. Appended when reserved; ends once, when the part is fitted by
 * the repair or released. A unit is held by one open reservation at a time (partial unique index),
 * and never at once by a case and by a lab matched set (triggers of migration 0033, both ways).
 */
export const caseReservations = sqliteTable(
  "case_reservations",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    caseId: text("case_id")
      .notNull()
      .references(() => serviceCases.id),
    itemId: text("item_id")
      .notNull()
      .references(() => items.id),
    side: text("side", { enum: ["L", "R"] }).notNull(),
    /** The model's position code ("T", "B"…) or "XO" for the crossover board. */
    position: text("position").notNull(),
    /** The "case.part_reserved" event. */
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" }).notNull(),
    endedAt: integer("ended_at", { mode: "timestamp_ms" }),
    endEventId: integer("end_event_id").references(() => events.id),
    endReason: text("end_reason", { enum: ["fitted", "released"] }),
  },
  (t) => [
    uniqueIndex("case_reservations_reserved_once").on(t.itemId).where(sql`${t.endedAt} IS NULL`),
    // One part held for a place of the pair at a time.
    uniqueIndex("case_reservations_one_per_place").on(t.caseId, t.side, t.position).where(sql`${t.endedAt} IS NULL`),
    index("case_reservations_case_idx").on(t.caseId),
    check("case_reservations_end_complete", sql`(${t.endedAt} IS NULL) = (${t.endEventId} IS NULL) AND (${t.endedAt} IS NULL) = (${t.endReason} IS NULL)`),
  ],
);

export type CaseReservation = typeof caseReservations.$inferSelect;
