import { sql } from "drizzle-orm";
import { check, index, integer, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { events } from "./events";
import { items, owners } from "./genealogy";
import { dealers } from "./workshop";

import { CASE_STATES } from "../../lib/vocabulary/case-states";

/**
 * A service case: a returned speaker (or a whole pair) from intake to its way home. The facts of
 * the intake never change; `state` moves along lib/vocabulary/case-states.ts (a trigger refuses
 * any other change, and any change to another column), and every move is an event.
 */
export const serviceCases = sqliteTable(
  "service_cases",
  {
    id: text("id").primaryKey(),
    /** The desk's code for the case, e.g. "RT2612-0007" (lib/service). */
    code: text("code").notNull().unique(),
    /** What came back: one speaker, or the pair itself when both came back. */
    itemId: text("item_id")
      .notNull()
      .references(() => items.id),
    pairId: text("pair_id")
      .notNull()
      .references(() => items.id),
    /** The speaker that stayed with the owner; null when the whole pair came back. */
    partnerId: text("partner_id").references(() => items.id),
    /** The dealer the pair was shipped to. */
    dealerId: text("dealer_id").references(() => dealers.id),
    ownerId: text("owner_id").references(() => owners.id),
    returnedBy: text("returned_by", { enum: ["owner", "dealer"] }).notNull(),
    /** The workshop's calendar day it arrived, YYYY-MM-DD. */
    receivedOn: text("received_on").notNull(),
    symptom: text("symptom").notNull(),
    state: text("state", { enum: CASE_STATES }).notNull().default("received"),
    openedAt: integer("opened_at", { mode: "timestamp_ms" }).notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
  },
  (t) => [
    // A pair is in one open case at a time.
    uniqueIndex("service_cases_one_open_per_pair")
      .on(t.pairId)
      .where(sql`${t.state} NOT IN ('closed', 'cancelled')`),
    index("service_cases_state_idx").on(t.state, t.openedAt),
    check("service_cases_received_on", sql`${t.receivedOn} GLOB '[0-9][0-9][0-9][0-9]-[0-9][0-9]-[0-9][0-9]'`),
    check("service_cases_symptom", sql`length(trim(${t.symptom})) BETWEEN 1 AND 2000`),
  ],
);

/** A finding of the diagnosis: what failed at one position of one side. Appended, never changed. */
export const caseFindings = sqliteTable(
  "case_findings",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    caseId: text("case_id")
      .notNull()
      .references(() => serviceCases.id),
    side: text("side", { enum: ["L", "R"] }).notNull(),
    /** The model's position code ("T", "M", "B"…) or "XO" for the crossover. */
    position: text("position").notNull(),
    finding: text("finding").notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [index("case_findings_case_idx").on(t.caseId, t.id)],
);

export type ServiceCase = typeof serviceCases.$inferSelect;
export type CaseFinding = typeof caseFindings.$inferSelect;
