import { sql } from "drizzle-orm";
import { check, index, integer, primaryKey, sqliteTable, text, uniqueIndex, type AnySQLiteColumn } from "drizzle-orm/sqlite-core";
import { events } from "./events";
import { dealers, finishes, models } from "./workshop";

import { ITEM_KINDS, SHARED_KINDS, type ItemKind } from "../../lib/vocabulary/item-kinds";

export { ITEM_KINDS, SHARED_KINDS, type ItemKind };

/**
 * One physical thing (or one lot of them) with its identity: a serial for serialised kinds, a lot
 * code for lots, a flitch code or flitch/leaf number for veneer.
 */
export const items = sqliteTable(
  "items",
  {
    id: text("id").primaryKey(),
    kind: text("kind", { enum: ITEM_KINDS }).notNull(),
    /** Serial, lot code or veneer reference, unique across the register. */
    identity: text("identity").notNull().unique(),
    modelId: text("model_id").references(() => models.id),
    finishId: text("finish_id").references(() => finishes.id),
    /** tweeter | midrange | bass for drive units; the component type (capacitor, inductor…) for lots. */
    partType: text("part_type"),
    /** Current state (in_stock, fitted, built, packed, shipped, returned, failed, scrapped…); every change is an event. */
    state: text("state").notNull(),
    /** For shipments: the dealer it went to. */
    dealerId: text("dealer_id").references(() => dealers.id),
    /** Supplier, maker's serial, side (L/R) and other facts of this kind. */
    attrs: text("attrs", { mode: "json" }).$type<Record<string, unknown>>().notNull().default({}),
    createdAt: integer("created_at", { mode: "timestamp_ms" })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
    createdEventId: integer("created_event_id").references(() => events.id),
  },
  (t) => [
    index("items_kind_idx").on(t.kind, t.createdAt),
    index("items_model_idx").on(t.modelId),
    // The work in hand (pairs in production, cabinets on the route, cartons waiting) is a few dozen
    // items among a million of the same kind: the area pages find them by state, in creation order.
    index("items_kind_state_idx").on(t.kind, t.state, t.createdAt),
  ],
);

/**
 * "Child sits in parent at position P" from startedAt until endedAt. A link is appended when a
 * part is fitted; removal writes endedAt (once, by trigger) and never deletes it, so every past
 * state of the register can be read back.
 */
export const links = sqliteTable(
  "links",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    parentId: text("parent_id")
      .notNull()
      .references(() => items.id),
    childId: text("child_id")
      .notNull()
      .references(() => items.id),
    position: text("position").notNull(),
    /**
     * The parent's kind and identity, copied at fitting (a trigger checks them; identities never
     * change), so a forward trace reads holders from one covering index without visiting items.
     */
    parentKind: text("parent_kind"),
    parentIdentity: text("parent_identity"),
    /** True for a lot (many parents at once); set from the child's kind and checked by trigger. */
    shared: integer("shared", { mode: "boolean" }).notNull().default(false),
    startedAt: integer("started_at", { mode: "timestamp_ms" }).notNull(),
    endedAt: integer("ended_at", { mode: "timestamp_ms" }),
    fitEventId: integer("fit_event_id")
      .notNull()
      .references(() => events.id),
    removeEventId: integer("remove_event_id").references(() => events.id),
  },
  (t) => [
    // A physical part sits in at most one parent at a time…
    uniqueIndex("links_one_parent").on(t.childId).where(sql`${t.endedAt} IS NULL AND ${t.shared} = 0`),
    // …and a position of a parent holds one thing at a time (lots excepted: a crossover holds several).
    uniqueIndex("links_one_per_position").on(t.parentId, t.position).where(sql`${t.endedAt} IS NULL AND ${t.shared} = 0`),
    index("links_parent_idx").on(t.parentId, t.startedAt),
    index("links_child_idx").on(t.childId, t.startedAt),
    // Covers the forward trace "now": child → parent with the parent's kind and identity.
    index("links_open_holders").on(t.childId, t.parentId, t.parentKind, t.parentIdentity).where(sql`${t.endedAt} IS NULL`),
    // Covers the walk up every link, open or ended (when an item shipped, the first shipment of a
    // pair): child → parent, its kind and the fitting time, without visiting the table.
    index("links_up").on(t.childId, t.parentId, t.parentKind, t.startedAt),
    // The few ended links (parts removed), so a walk up from the holdings index finds them cheaply.
    index("links_ended").on(t.childId).where(sql`${t.endedAt} IS NOT NULL`),
    check("links_not_self", sql`${t.parentId} <> ${t.childId}`),
    check("links_end_after_start", sql`${t.endedAt} IS NULL OR ${t.endedAt} >= ${t.startedAt}`),
    check("links_end_has_event", sql`(${t.endedAt} IS NULL) = (${t.removeEventId} IS NULL)`),
  ],
);

/**
 * Who holds what now, kept by `fit` and `removeFrom` in the same transaction as the link: one row
 * per (item, holder above it) with the number of link paths between them (a lot reaches a pair
 * through both speakers' crossovers). It is an index of the open links, derived and rebuilt from
 * them, not a record: rows come and go as parts are fitted and removed. It lets a recall of a lot
 * held by thousands of serials read one index range instead of walking the graph.
 */
export const holdings = sqliteTable(
  "holdings",
  {
    itemId: text("item_id").notNull(),
    holderId: text("holder_id").notNull(),
    holderKind: text("holder_kind").notNull(),
    holderIdentity: text("holder_identity").notNull(),
    paths: integer("paths").notNull(),
  },
  (t) => [
    primaryKey({ columns: [t.itemId, t.holderId] }),
    index("holdings_holder_idx").on(t.holderId),
    // An item's holders by kind, read from the index alone: a lot's shipments among its 15,000
    // holders, or the whole forward trace of a recall, without visiting the table.
    index("holdings_item_kind").on(t.itemId, t.holderKind, t.holderId, t.holderIdentity),
    // Removal counts a row down to zero, then deletes the zeros through this small index.
    index("holdings_spent_idx").on(t.itemId).where(sql`${t.paths} = 0`),
    check("holdings_paths_not_negative", sql`${t.paths} >= 0`),
  ],
);

/** Per-kind, per-year serial sequences; the allocator takes the next number inside the transaction. */
export const serialSequences = sqliteTable(
  "serial_sequences",
  {
    kind: text("kind").notNull(),
    year: integer("year").notNull(),
    last: integer("last").notNull(),
  },
  (t) => [uniqueIndex("serial_sequences_pk").on(t.kind, t.year)],
);

/** People who own a pair (for the service desk). */
export const owners = sqliteTable("owners", {
  id: text("id").primaryKey(),
  name: text("name").notNull(),
  email: text("email"),
  town: text("town").notNull(),
  country: text("country").notNull(),
  createdAt: integer("created_at", { mode: "timestamp_ms" })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`),
  /**
   * A duplicate merged into another record (lib/workshop/owners.ts): it stays as history, pointing
   * at the record that carries its ownerships and consent on.
   */
  mergedIntoId: text("merged_into_id").references((): AnySQLiteColumn => owners.id),
});

/** An owner registered as holding an item (usually a pair) from a date; appended, never edited. */
export const ownerships = sqliteTable(
  "ownerships",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    ownerId: text("owner_id")
      .notNull()
      .references(() => owners.id),
    itemId: text("item_id")
      .notNull()
      .references(() => items.id),
    since: integer("since", { mode: "timestamp_ms" }).notNull(),
    eventId: integer("event_id").references(() => events.id),
  },
  (t) => [index("ownerships_item_idx").on(t.itemId), index("ownerships_owner_idx").on(t.ownerId)],
);

export type Item = typeof items.$inferSelect;
export type Link = typeof links.$inferSelect;
export type Owner = typeof owners.$inferSelect;
