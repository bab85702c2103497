import { sql } from "drizzle-orm";
import { PART_TYPES } from "../../lib/vocabulary/part-types";
import { check, integer, primaryKey, real, sqliteTable, text } from "drizzle-orm/sqlite-core";

/** A speaker design. */
export const models = sqliteTable(
  "models",
  {
    id: text("id").primaryKey(),
    /** Short code used inside serials (2–4 capitals or digits). */
    code: text("code").notNull().unique(),
    name: text("name").notNull(),
    /** Veneer leaves one cabinet face takes, and their minimum size. */
    leavesPerFace: integer("leaves_per_face").notNull(),
    minLeafLengthMm: real("min_leaf_length_mm").notNull(),
    minLeafWidthMm: real("min_leaf_width_mm").notNull(),
    /** Finished pair response limit |L − R| in dB over [responseMinHz, responseMaxHz]. */
    pairResponseLimitDb: real("pair_response_limit_db").notNull(),
    responseMinHz: real("response_min_hz").notNull(),
    responseMaxHz: real("response_max_hz").notNull(),
    /** GTIN-14 of the packed pair. */
    pairGtin: text("pair_gtin").notNull(),
    /**
     * Warranty from the day the pair shipped (or its owner registered it, where that is later), in
     * months, 0–600 (a CHECK on the column, added with it by migration 0024).
     */
    warrantyMonths: integer("warranty_months").notNull().default(24),
    active: integer("active", { mode: "boolean" }).notNull().default(true),
  },
  (t) => [
    check("models_code_format", sql`${t.code} GLOB '[A-Z0-9][A-Z0-9]*' AND length(${t.code}) BETWEEN 2 AND 4`),
    check("models_leaves_positive", sql`${t.leavesPerFace} >= 1`),
    check("models_range", sql`${t.responseMinHz} > 0 AND ${t.responseMaxHz} > ${t.responseMinHz}`),
    check("models_gtin_format", sql`length(${t.pairGtin}) = 14 AND ${t.pairGtin} GLOB '[0-9]*' AND ${t.pairGtin} NOT GLOB '*[^0-9]*'`),
  ],
);

/** Drive-unit positions of a model: position code (e.g. "T"), its part type and how many units sit there. */
export const modelPositions = sqliteTable(
  "model_positions",
  {
    modelId: text("model_id")
      .notNull()
      .references(() => models.id, { onDelete: "cascade" }),
    position: text("position").notNull(),
    partType: text("part_type", { enum: PART_TYPES }).notNull(),
    count: integer("count").notNull().default(1),
  },
  (t) => [primaryKey({ columns: [t.modelId, t.position] }), check("model_positions_count", sql`${t.count} >= 1`)],
);

/**
 * Trim-part positions of a model: position code (e.g. "TOP", "PLINTH"), what people call the part
 * there ("Top housing") and how many a speaker takes. Trim parts are serialised items
 * (kind trim_part, partType = the position code) that travel the model's trim route before
 * assembly fits them here.
 */
export const modelTrimPositions = sqliteTable(
  "model_trim_positions",
  {
    modelId: text("model_id")
      .notNull()
      .references(() => models.id, { onDelete: "cascade" }),
    position: text("position").notNull(),
    label: text("label").notNull(),
    count: integer("count").notNull().default(1),
  },
  (t) => [
    primaryKey({ columns: [t.modelId, t.position] }),
    check("model_trim_positions_count", sql`${t.count} >= 1`),
    check("model_trim_positions_code", sql`${t.position} GLOB '[A-Z][A-Z0-9-]*' AND length(${t.position}) BETWEEN 2 AND 12`),
  ],
);

/** Drive-unit mismatch limit per part type: the largest band difference allowed between left and right. */
export const modelTolerances = sqliteTable(
  "model_tolerances",
  {
    modelId: text("model_id")
      .notNull()
      .references(() => models.id, { onDelete: "cascade" }),
    partType: text("part_type", { enum: PART_TYPES }).notNull(),
    mismatchLimitDb: real("mismatch_limit_db").notNull(),
  },
  (t) => [primaryKey({ columns: [t.modelId, t.partType] }), check("model_tolerances_positive", sql`${t.mismatchLimitDb} > 0`)],
);

/**
 * A veneer species (pair born at the flitch) or a lacquer colour (cabinets paired at assembly).
 * `name` is the trade name of a species or the colour's name.
 */
export const finishes = sqliteTable("finishes", {
  id: text("id").primaryKey(),
  code: text("code").notNull().unique(),
  name: text("name").notNull(),
  kind: text("kind", { enum: ["veneer", "lacquer"] }).notNull(),
  /** Free words kept from before the columns below (e.g. a lacquer's sheen); shown after them. */
  detail: text("detail").notNull().default(""),
  /** A species' botanical name ("Juglans nigra"); empty for a lacquer. */
  botanicalName: text("botanical_name").notNull().default(""),
  /** How a species' leaves are cut (lib/vocabulary/veneer-cuts.ts); empty for a lacquer. */
  cut: text("cut").notNull().default(""),
  /** A lacquer's colour reference: an sRGB hex ("#3E4A52") or a colour-card reference; empty for a species. */
  colourRef: text("colour_ref").notNull().default(""),
  active: integer("active", { mode: "boolean" }).notNull().default(true),
});

export const dealers = sqliteTable("dealers", {
  id: text("id").primaryKey(),
  code: text("code").notNull().unique(),
  name: text("name").notNull(),
  /** Street lines of the delivery address, one per line. */
  address: text("address").notNull().default(""),
  postcode: text("postcode").notNull().default(""),
  city: text("city").notNull(),
  /** ISO 3166-1 alpha-2 code ("GB", "FR"). */
  country: text("country").notNull(),
  email: text("email").notNull(),
  active: integer("active", { mode: "boolean" }).notNull().default(true),
});

/**
 * Crossover positions of a model: every model has "XO"; a model may name more ("XO-B" for a
 * separate bass board). Assembly fits the board at XO.
 */
export const modelCrossoverPositions = sqliteTable(
  "model_crossover_positions",
  {
    modelId: text("model_id")
      .notNull()
      .references(() => models.id, { onDelete: "cascade" }),
    position: text("position").notNull(),
    count: integer("count").notNull().default(1),
  },
  (t) => [
    primaryKey({ columns: [t.modelId, t.position] }),
    check("model_crossover_positions_count", sql`${t.count} >= 1`),
    check("model_crossover_positions_code", sql`${t.position} GLOB 'XO*' AND length(${t.position}) BETWEEN 2 AND 12`),
  ],
);

export type Model = typeof models.$inferSelect;

export type Finish = typeof finishes.$inferSelect;
export type Dealer = typeof dealers.$inferSelect;
export type ModelTrimPosition = typeof modelTrimPositions.$inferSelect;
