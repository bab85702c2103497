import { sql } from "drizzle-orm";
import { check, index, integer, real, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { users } from "./auth";
import { events } from "./events";
import { items } from "./genealogy";
import { responses } from "./lab";
import { dealers, models } from "./workshop";

/** The final pair test: left and right finished responses compared band by band over the model's range. */
export const finalTests = sqliteTable(
  "final_tests",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    pairId: text("pair_id")
      .notNull()
      .references(() => items.id),
    leftResponseId: integer("left_response_id")
      .notNull()
      .references(() => responses.id),
    rightResponseId: integer("right_response_id")
      .notNull()
      .references(() => responses.id),
    limitDb: real("limit_db").notNull(),
    maxDiffDb: real("max_diff_db").notNull(),
    worstBand: text("worst_band").notNull(),
    pass: integer("pass", { mode: "boolean" }).notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
  },
  (t) => [index("final_tests_pair_idx").on(t.pairId, t.id)],
);

/**
 * A pair's certificate. `code` is the unguessable part of its public verification link. Issued
 * once per pair; every print (the first, and each copy) is an event.
 */
export const certificates = sqliteTable("certificates", {
  id: text("id").primaryKey(),
  pairId: text("pair_id")
    .notNull()
    .unique()
    .references(() => items.id),
  code: text("code").notNull().unique(),
  issuedAt: integer("issued_at", { mode: "timestamp_ms" }).notNull(),
  eventId: integer("event_id")
    .notNull()
    .references(() => events.id),
});

/**
 * Every print of a certificate: the first one not asked for as a copy is the original, every
 * other a copy (marked COPY). The partial unique index holds it to one original per certificate
 * whatever the concurrency; the "certificate.printed" event says the same in the log.
 */
export const certificatePrints = sqliteTable(
  "certificate_prints",
  {
    id: text("id").primaryKey(),
    certificateId: text("certificate_id")
      .notNull()
      .references(() => certificates.id),
    original: integer("original", { mode: "boolean" }).notNull(),
    /** Who printed it: a print is shown again only to them, for a short while. Null: the system (seed). */
    actorId: text("actor_id").references(() => users.id),
    eventId: integer("event_id")
      .notNull()
      .unique()
      .references(() => events.id),
    printedAt: integer("printed_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [
    uniqueIndex("certificate_prints_one_original").on(t.certificateId).where(sql`${t.original} = 1`),
    index("certificate_prints_certificate_idx").on(t.certificateId, t.printedAt),
  ],
);

/** What goes in a model's carton, in packing order (both speakers and the certificate are always first). */
export const packingItems = sqliteTable(
  "packing_items",
  {
    modelId: text("model_id")
      .notNull()
      .references(() => models.id),
    position: integer("position").notNull(),
    label: text("label").notNull(),
    /**
     * The accessory's code (its GTIN, or a code of the workshop's own) when it carries one: the
     * packer then scans it in. Without one the line is ticked (a manual, a cloth).
     */
    code: text("code"),
  },
  (t) => [uniqueIndex("packing_items_pk").on(t.modelId, t.position)],
);

/** Where a packed carton is stored; appended, the newest counts. */
export const cartonLocations = sqliteTable(
  "carton_locations",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    cartonId: text("carton_id")
      .notNull()
      .references(() => items.id),
    location: text("location").notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    at: integer("at", { mode: "timestamp_ms" })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
  },
  (t) => [index("carton_locations_carton_idx").on(t.cartonId, t.id)],
);

/**
 * A carton's SSCC (GS1 AI 00), allocated in the transaction that makes the carton: extension
 * digit, company prefix and serial reference as they were set then, and the 18 digits. Appended
 * once per carton, never changed (triggers of its migration).
 */
export const cartonSsccs = sqliteTable(
  "carton_ssccs",
  {
    cartonId: text("carton_id")
      .primaryKey()
      .references(() => items.id),
    sscc: text("sscc").notNull().unique(),
    extension: integer("extension").notNull(),
    companyPrefix: text("company_prefix").notNull(),
    serialReference: integer("serial_reference").notNull(),
    assignedAt: integer("assigned_at", { mode: "timestamp_ms" }).notNull(),
  },
  (t) => [
    uniqueIndex("carton_ssccs_reference").on(t.extension, t.companyPrefix, t.serialReference),
    check("carton_ssccs_digits", sql`length(${t.sscc}) = 18 AND ${t.sscc} NOT GLOB '*[^0-9]*'`),
  ],
);

/** A shipment's particulars (the shipment itself is an item holding its cartons). */
export const shipmentDetails = sqliteTable(
  "shipment_details",
  {
    itemId: text("item_id")
      .primaryKey()
      .references(() => items.id),
    dealerId: text("dealer_id")
      .notNull()
      .references(() => dealers.id),
    shippedOn: text("shipped_on").notNull(),
    carrier: text("carrier").notNull(),
    tracking: text("tracking").notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
  },
  (t) => [check("shipment_details_date", sql`${t.shippedOn} GLOB '[0-9][0-9][0-9][0-9]-[0-9][0-9]-[0-9][0-9]'`)],
);

export type FinalTest = typeof finalTests.$inferSelect;
export type Certificate = typeof certificates.$inferSelect;
export type CartonSscc = typeof cartonSsccs.$inferSelect;
export type PackingItem = typeof packingItems.$inferSelect;
export type CertificatePrint = typeof certificatePrints.$inferSelect;
