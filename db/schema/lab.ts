import { sql } from "drizzle-orm";
import { check, index, integer, real, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { users } from "./auth";
import { events } from "./events";
import { items } from "./genealogy";
import { models } from "./workshop";

import { PART_TYPES } from "../../lib/vocabulary/part-types";

/** A batch of drive units of one part type as they came in from the maker, with its lot. */
export const unitBatches = sqliteTable(
  "unit_batches",
  {
    id: text("id").primaryKey(),
    /** Twinleaf's name for the batch, e.g. "TW-2612-01". */
    code: text("code").notNull().unique(),
    partType: text("part_type", { enum: PART_TYPES }).notNull(),
    /** The maker's part number, e.g. a tweeter type. */
    partNumber: text("part_number").notNull(),
    maker: text("maker").notNull(),
    /** The maker's production lot or the supplier's delivery reference. */
    lot: text("lot").notNull(),
    receivedOn: text("received_on").notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
  },
  (t) => [check("unit_batches_received_on", sql`${t.receivedOn} GLOB '[0-9][0-9][0-9][0-9]-[0-9][0-9]-[0-9][0-9]'`)],
);

/** Which batch a drive unit came in, and the maker's own serial from its label. */
export const batchUnits = sqliteTable(
  "batch_units",
  {
    itemId: text("item_id")
      .primaryKey()
      .references(() => items.id),
    batchId: text("batch_id")
      .notNull()
      .references(() => unitBatches.id),
    makerSerial: text("maker_serial"),
  },
  (t) => [index("batch_units_batch_idx").on(t.batchId), uniqueIndex("batch_units_maker_serial").on(t.batchId, t.makerSerial).where(sql`${t.makerSerial} IS NOT NULL`)],
);

export const MEASUREMENT_SOURCES = ["form", "csv", "upload", "api"] as const;

/**
 * A measured frequency response of a drive unit or crossover: appended, never changed; the newest
 * one counts. Points are [hz, db] or [hz, db, phaseDeg].
 */
export const responses = sqliteTable(
  "responses",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    itemId: text("item_id")
      .notNull()
      .references(() => items.id),
    /** "unit" for a drive unit or crossover on the bench; "final" for a finished speaker at the final pair test. */
    purpose: text("purpose", { enum: ["unit", "final"] }).notNull().default("unit"),
    points: text("points", { mode: "json" }).$type<number[][]>().notNull(),
    fileName: text("file_name"),
    source: text("source", { enum: MEASUREMENT_SOURCES }).notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
  },
  (t) => [index("responses_item_idx").on(t.itemId, t.id)],
);

/**
 * A drive unit's response as matching reads it: its one-third-octave band levels over the part
 * type's passband (`min_hz`–`max_hz`), worked out once when the response is recorded, so the lab's
 * pages need not read and band every point of every free unit. Derived from the response, like an
 * index: a passband changed in code finds no row of its range, and the levels are worked out from
 * the points again.
 */
export const responseBands = sqliteTable("response_bands", {
  responseId: integer("response_id")
    .primaryKey()
    .references(() => responses.id),
  minHz: real("min_hz").notNull(),
  maxHz: real("max_hz").notNull(),
  levels: text("levels", { mode: "json" }).$type<number[]>().notNull(),
});

/** Thiele–Small parameters of a drive unit: appended, never changed; the newest set counts. */
export const tsParams = sqliteTable(
  "ts_params",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    itemId: text("item_id")
      .notNull()
      .references(() => items.id),
    fsHz: real("fs_hz"),
    qts: real("qts"),
    qes: real("qes"),
    qms: real("qms"),
    reOhm: real("re_ohm"),
    vasL: real("vas_l"),
    sensitivityDb: real("sensitivity_db"),
    source: text("source", { enum: MEASUREMENT_SOURCES }).notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
  },
  (t) => [index("ts_params_item_idx").on(t.itemId, t.id)],
);

/**
 * A matched set: two drive units (or two crossovers) chosen to sit left and right in one future
 * pair, from an accepted plan. Its members are reserved for it until assembly fits them or the set
 * is released; the partial unique index is the guarantee that a unit is reserved once only.
 */
export const matchedSets = sqliteTable(
  "matched_sets",
  {
    id: text("id").primaryKey(),
    code: text("code").notNull().unique(),
    kind: text("kind", { enum: ["drive_unit", "crossover"] }).notNull(),
    partType: text("part_type"),
    batchId: text("batch_id").references(() => unitBatches.id),
    /** The model whose limit the set was matched against. */
    modelId: text("model_id").references(() => models.id),
    cost: real("cost").notNull(),
    maxDiffDb: real("max_diff_db").notNull(),
    limitDb: real("limit_db").notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
  },
  (t) => [index("matched_sets_batch_idx").on(t.batchId)],
);

export const setMembers = sqliteTable(
  "set_members",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    setId: text("set_id")
      .notNull()
      .references(() => matchedSets.id),
    itemId: text("item_id")
      .notNull()
      .references(() => items.id),
    side: text("side", { enum: ["L", "R"] }).notNull(),
    /** Ends once: fitted at assembly, or the set released. */
    endedAt: integer("ended_at", { mode: "timestamp_ms" }),
    endEventId: integer("end_event_id").references(() => events.id),
    endReason: text("end_reason", { enum: ["fitted", "released"] }),
  },
  (t) => [
    uniqueIndex("set_members_reserved_once").on(t.itemId).where(sql`${t.endedAt} IS NULL`),
    uniqueIndex("set_members_side").on(t.setId, t.side),
    index("set_members_set_idx").on(t.setId),
    check("set_members_end_complete", sql`(${t.endedAt} IS NULL) = (${t.endEventId} IS NULL) AND (${t.endedAt} IS NULL) = (${t.endReason} IS NULL)`),
  ],
);

/** A crossover board's build: which component lot sits at each position, its nominal and its reading. */
export const crossoverParts = sqliteTable(
  "crossover_parts",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    crossoverId: text("crossover_id")
      .notNull()
      .references(() => items.id),
    position: text("position").notNull(),
    lotId: text("lot_id")
      .notNull()
      .references(() => items.id),
    partNumber: text("part_number").notNull(),
    nominal: real("nominal").notNull(),
    unit: text("unit", { enum: ["F", "H", "Ω"] }).notNull(),
    tolerance: text("tolerance").notNull(),
    reading: real("reading"),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
  },
  (t) => [uniqueIndex("crossover_parts_position").on(t.crossoverId, t.position), check("crossover_parts_nominal", sql`${t.nominal} > 0`)],
);

/** A bench's key to the lab's JSON endpoints. Only a hash is kept; revoking sets `revoked_at` once. */
export const machineTokens = sqliteTable(
  "machine_tokens",
  {
    id: text("id").primaryKey(),
    name: text("name").notNull(),
    /** SHA-256 of the token, hex. The token itself is shown once, when it is made. */
    tokenHash: text("token_hash").notNull().unique(),
    /** The first characters of the token, to tell tokens apart in the list. */
    prefix: text("prefix").notNull(),
    scope: text("scope", { enum: ["lab"] }).notNull(),
    createdBy: text("created_by").references(() => users.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
    eventId: integer("event_id").references(() => events.id),
    revokedAt: integer("revoked_at", { mode: "timestamp_ms" }),
    revokedBy: text("revoked_by").references(() => users.id),
    revokeEventId: integer("revoke_event_id").references(() => events.id),
  },
  (t) => [check("machine_tokens_revoke_complete", sql`(${t.revokedAt} IS NULL) = (${t.revokeEventId} IS NULL)`)],
);

export type UnitBatch = typeof unitBatches.$inferSelect;
export type Response = typeof responses.$inferSelect;
export type TsParams = typeof tsParams.$inferSelect;
export type MatchedSet = typeof matchedSets.$inferSelect;
export type MachineToken = typeof machineTokens.$inferSelect;
