import { sql } from "drizzle-orm";
import { check, index, integer, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { users } from "./auth";
import { events } from "./events";
import { items } from "./genealogy";
import { models } from "./workshop";
import type { ReadingValue, StepSpec } from "@/lib/route/types";
import { ROUTE_KINDS } from "../../lib/vocabulary/route-kinds";

/** A model's route, versioned: editing makes a new version; a pair keeps the version it started under. */
export const processSpecs = sqliteTable(
  "process_specs",
  {
    id: text("id").primaryKey(),
    modelId: text("model_id")
      .notNull()
      .references(() => models.id),
    /** What travels this route: the model's cabinets or its trim parts; each kind is versioned on its own. */
    routeKind: text("route_kind", { enum: ROUTE_KINDS }).notNull().default("cabinet"),
    version: integer("version").notNull(),
    steps: text("steps", { mode: "json" }).$type<StepSpec[]>().notNull(),
    note: text("note").notNull().default(""),
    createdBy: text("created_by").references(() => users.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
    eventId: integer("event_id").references(() => events.id),
  },
  (t) => [uniqueIndex("process_specs_model_kind_version").on(t.modelId, t.routeKind, t.version), check("process_specs_version", sql`${t.version} >= 1`)],
);

/** The spec version a pair follows, fixed when its first step is recorded. */
export const routeStarts = sqliteTable("route_starts", {
  pairId: text("pair_id")
    .primaryKey()
    .references(() => items.id),
  specId: text("spec_id")
    .notNull()
    .references(() => processSpecs.id),
  eventId: integer("event_id")
    .notNull()
    .references(() => events.id),
});

/** A step done by one or both cabinets of a pair, with its readings. Appended, never changed. */
export const routeRecords = sqliteTable(
  "route_records",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    pairId: text("pair_id")
      .notNull()
      .references(() => items.id),
    specId: text("spec_id")
      .notNull()
      .references(() => processSpecs.id),
    seq: integer("seq").notNull(),
    /** The cabinets that did it: their item ids and sides, e.g. [{"id":…,"side":"L"}]. */
    cabinets: text("cabinets", { mode: "json" }).$type<{ id: string; side: "L" | "R" }[]>().notNull(),
    startedAt: integer("started_at", { mode: "timestamp_ms" }).notNull(),
    recordedAt: integer("recorded_at", { mode: "timestamp_ms" }).notNull(),
    readings: text("readings", { mode: "json" }).$type<Record<string, ReadingValue>>().notNull(),
    outOfWindow: integer("out_of_window", { mode: "boolean" }).notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
  },
  (t) => [index("route_records_pair_idx").on(t.pairId, t.id), check("route_records_started", sql`${t.startedAt} <= ${t.recordedAt} + 60000`)],
);

/**
 * A mistyped reading put right: the record's readings (and, where given, its start) as they
 * should have been, with the reason and who corrected it. The record itself is never changed:
 * the newest correction of a record is what the route reads. Appended, never changed.
 */
export const routeCorrections = sqliteTable(
  "route_corrections",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    recordId: integer("record_id")
      .notNull()
      .references(() => routeRecords.id),
    pairId: text("pair_id")
      .notNull()
      .references(() => items.id),
    /** Every reading of the record after the correction (not only those changed). */
    readings: text("readings", { mode: "json" }).$type<Record<string, ReadingValue>>().notNull(),
    /** The keys whose value this correction changed, and "startedAt" when the start moved. */
    changed: text("changed", { mode: "json" }).$type<string[]>().notNull(),
    startedAt: integer("started_at", { mode: "timestamp_ms" }).notNull(),
    outOfWindow: integer("out_of_window", { mode: "boolean" }).notNull(),
    reason: text("reason").notNull(),
    correctedBy: text("corrected_by")
      .notNull()
      .references(() => users.id),
    correctedAt: integer("corrected_at", { mode: "timestamp_ms" }).notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
  },
  (t) => [
    index("route_corrections_record_idx").on(t.recordId, t.id),
    index("route_corrections_pair_idx").on(t.pairId),
    check("route_corrections_reason", sql`length(trim(${t.reason})) >= 5`),
    check("route_corrections_started", sql`${t.startedAt} <= ${t.correctedAt} + 60000`),
  ],
);

/** Quality's dispositions; `entry_error` closes a nonconformance that a corrected typing slip opened. */
export const DISPOSITIONS = ["rework", "use_as_is", "scrap", "entry_error"] as const;

/**
 * A reading outside its window: the pair is on hold until quality dispositions it, once: rework
 * (back to a named step), use as is (a deviation with its reason and approver), or scrap a cabinet.
 */
export const nonconformances = sqliteTable(
  "nonconformances",
  {
    id: text("id").primaryKey(),
    code: text("code").notNull().unique(),
    pairId: text("pair_id")
      .notNull()
      .references(() => items.id),
    recordId: integer("record_id").references(() => routeRecords.id),
    cabinets: text("cabinets", { mode: "json" }).$type<{ id: string; side: "L" | "R" }[]>().notNull(),
    seq: integer("seq").notNull(),
    /** What was out of window, in words: "Platen temperature 141 °C (window 135–140 °C)". */
    finding: text("finding").notNull(),
    openedAt: integer("opened_at", { mode: "timestamp_ms" }).notNull(),
    openedEventId: integer("opened_event_id")
      .notNull()
      .references(() => events.id),
    disposition: text("disposition", { enum: DISPOSITIONS }),
    reworkToSeq: integer("rework_to_seq"),
    scrapCabinetId: text("scrap_cabinet_id").references(() => items.id),
    reason: text("reason"),
    approvedBy: text("approved_by").references(() => users.id),
    dispositionedAt: integer("dispositioned_at", { mode: "timestamp_ms" }),
    dispositionEventId: integer("disposition_event_id").references(() => events.id),
  },
  (t) => [
    index("nonconformances_pair_idx").on(t.pairId),
    index("nonconformances_open_idx").on(t.openedAt).where(sql`${t.disposition} IS NULL`),
    check(
      "nonconformances_disposition_complete",
      sql`(${t.disposition} IS NULL) = (${t.dispositionedAt} IS NULL) AND (${t.disposition} IS NULL) = (${t.dispositionEventId} IS NULL) AND (${t.disposition} IS NULL OR (length(trim(coalesce(${t.reason}, ''))) > 0 AND ${t.approvedBy} IS NOT NULL))`,
    ),
    check("nonconformances_rework_has_step", sql`(${t.disposition} = 'rework') = (${t.reworkToSeq} IS NOT NULL)`),
    check("nonconformances_scrap_has_cabinet", sql`(${t.disposition} = 'scrap') = (${t.scrapCabinetId} IS NOT NULL)`),
  ],
);

export type ProcessSpec = typeof processSpecs.$inferSelect;
export type RouteRecord = typeof routeRecords.$inferSelect;
export type Nonconformance = typeof nonconformances.$inferSelect;
export type RouteCorrection = typeof routeCorrections.$inferSelect;
