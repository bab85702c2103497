import { sql } from "drizzle-orm";
import { check, index, integer, real, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { events } from "./events";
import { items } from "./genealogy";
import { finishes } from "./workshop";
import { DEFECT_KINDS } from "../../lib/vocabulary/defects";

/** What was recorded when a flitch came in. The flitch itself is an item (kind "flitch") with its serial. */
export const flitches = sqliteTable(
  "flitches",
  {
    itemId: text("item_id")
      .primaryKey()
      .references(() => items.id),
    /** The species, a veneer finish. */
    finishId: text("finish_id")
      .notNull()
      .references(() => finishes.id),
    logReference: text("log_reference").notNull(),
    supplier: text("supplier").notNull(),
    /** Calendar date the flitch arrived, YYYY-MM-DD. */
    receivedOn: text("received_on").notNull(),
    leafThicknessMm: real("leaf_thickness_mm").notNull(),
    /** Leaves 1…leafCount in slicing order. */
    leafCount: integer("leaf_count").notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
  },
  (t) => [
    check("flitches_thickness", sql`${t.leafThicknessMm} > 0 AND ${t.leafThicknessMm} <= 5`),
    check("flitches_leaf_count", sql`${t.leafCount} BETWEEN 1 AND 99`),
    check("flitches_received_on", sql`${t.receivedOn} GLOB '[0-9][0-9][0-9][0-9]-[0-9][0-9]-[0-9][0-9]'`),
  ],
);

/**
 * One leaf of a flitch at its place in slicing order (`seq`, never changed), with its measured
 * size and whether it may face a cabinet. Changes are recorded as events ("leaf.measured").
 */
export const veneerLeaves = sqliteTable(
  "veneer_leaves",
  {
    itemId: text("item_id")
      .primaryKey()
      .references(() => items.id),
    flitchId: text("flitch_id")
      .notNull()
      .references(() => flitches.itemId),
    seq: integer("seq").notNull(),
    lengthMm: real("length_mm"),
    widthMm: real("width_mm"),
    usable: integer("usable", { mode: "boolean" }).notNull().default(true),
  },
  (t) => [
    uniqueIndex("veneer_leaves_flitch_seq").on(t.flitchId, t.seq),
    check("veneer_leaves_seq", sql`${t.seq} >= 1`),
    check("veneer_leaves_length", sql`${t.lengthMm} IS NULL OR ${t.lengthMm} > 0`),
    check("veneer_leaves_width", sql`${t.widthMm} IS NULL OR ${t.widthMm} > 0`),
  ],
);


/** A defect found on a leaf: appended; clearing one (a mistaken entry) sets `cleared_event_id` once. */
export const leafDefects = sqliteTable(
  "leaf_defects",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    leafId: text("leaf_id")
      .notNull()
      .references(() => veneerLeaves.itemId),
    kind: text("kind", { enum: DEFECT_KINDS }).notNull(),
    note: text("note").notNull().default(""),
    /** Distance from the leaf's butt end, mm; null when it runs the whole leaf or was not measured. */
    positionMm: real("position_mm"),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    clearedEventId: integer("cleared_event_id").references(() => events.id),
  },
  (t) => [index("leaf_defects_leaf_idx").on(t.leafId), check("leaf_defects_position", sql`${t.positionMm} IS NULL OR ${t.positionMm} >= 0`)],
);

export const ALLOCATION_ROLES = ["face", "reserve"] as const;
export const ORIENTATIONS = ["as_cut", "turned"] as const;
export type Orientation = (typeof ORIENTATIONS)[number];

/**
 * A leaf given to a pair: either facing one of its cabinets at a face position, or held in reserve
 * for that pair's repairs. Appended; a reserve ends once (released into a cabinet, or returned).
 * The two partial unique indexes are the guarantee that no leaf ever faces two cabinets and no leaf
 * is promised to two pairs at once, whoever confirms at the same moment.
 */
export const leafAllocations = sqliteTable(
  "leaf_allocations",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    leafId: text("leaf_id")
      .notNull()
      .references(() => veneerLeaves.itemId),
    pairId: text("pair_id")
      .notNull()
      .references(() => items.id),
    role: text("role", { enum: ALLOCATION_ROLES }).notNull(),
    cabinetId: text("cabinet_id").references(() => items.id),
    position: text("position"),
    orientation: text("orientation", { enum: ORIENTATIONS }),
    startedAt: integer("started_at", { mode: "timestamp_ms" }).notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    endedAt: integer("ended_at", { mode: "timestamp_ms" }),
    endEventId: integer("end_event_id").references(() => events.id),
    endReason: text("end_reason", { enum: ["released", "returned"] }),
  },
  (t) => [
    // A leaf faces one cabinet, ever: a face that is re-veneered keeps its record, and its leaf is spent.
    uniqueIndex("leaf_allocations_face_once").on(t.leafId).where(sql`${t.role} = 'face'`),
    // A leaf is promised to one pair at a time.
    uniqueIndex("leaf_allocations_one_open").on(t.leafId).where(sql`${t.endedAt} IS NULL`),
    index("leaf_allocations_pair_idx").on(t.pairId),
    check(
      "leaf_allocations_face_has_place",
      sql`(${t.role} = 'face') = (${t.cabinetId} IS NOT NULL AND ${t.position} IS NOT NULL AND ${t.orientation} IS NOT NULL)`,
    ),
    check("leaf_allocations_face_never_ends", sql`${t.role} = 'reserve' OR ${t.endedAt} IS NULL`),
    check(
      "leaf_allocations_end_complete",
      sql`(${t.endedAt} IS NULL) = (${t.endEventId} IS NULL) AND (${t.endedAt} IS NULL) = (${t.endReason} IS NULL)`,
    ),
  ],
);

export type Flitch = typeof flitches.$inferSelect;
export type VeneerLeaf = typeof veneerLeaves.$inferSelect;
export type LeafDefect = typeof leafDefects.$inferSelect;
export type LeafAllocation = typeof leafAllocations.$inferSelect;
