import { sql } from "drizzle-orm";
import { check, integer, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { items } from "./genealogy";
import { models } from "./workshop";

/**
 * Every version of a model's spec as it was saved (the whole spec as JSON, lib/workshop/model-spec.ts),
 * appended, never changed. The `models` row and its position, tolerance, trim and packing rows are the
 * current version, which new work reads; an item keeps the version it was made under
 * (item_model_versions).
 */
export const modelVersions = sqliteTable(
  "model_versions",
  {
    id: text("id").primaryKey(),
    modelId: text("model_id")
      .notNull()
      .references(() => models.id),
    version: integer("version").notNull(),
    spec: text("spec", { mode: "json" }).notNull().$type<Record<string, unknown>>(),
    note: text("note").notNull().default(""),
    createdBy: text("created_by"),
    createdAt: integer("created_at", { mode: "timestamp_ms" }).notNull(),
    /** The event that saved it; null for the first versions written by the migration. */
    eventId: integer("event_id"),
  },
  (t) => [uniqueIndex("model_versions_model_version").on(t.modelId, t.version), check("model_versions_positive", sql`${t.version} >= 1`)],
);

/**
 * The model version an item was made under: written by a trigger on items (migration
 * model_versions_history) when an item of a model is registered, so no path can forget it.
 */
export const itemModelVersions = sqliteTable("item_model_versions", {
  itemId: text("item_id")
    .primaryKey()
    .references(() => items.id),
  modelVersionId: text("model_version_id")
    .notNull()
    .references(() => modelVersions.id),
});

export type ModelVersion = typeof modelVersions.$inferSelect;
