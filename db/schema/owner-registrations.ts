import { sql } from "drizzle-orm";
import { check, index, integer, sqliteTable, text, uniqueIndex } from "drizzle-orm/sqlite-core";
import { events } from "./events";
import { items, owners } from "./genealogy";

/**
 * An owner's own registration of a pair from the public certificate check. It counts only once the
 * owner has opened the link mailed to them (double opt-in): until then it is pending and no owner,
 * ownership or consent exists for it. Only the hash of the confirmation token is kept.
 */
export const ownerRegistrations = sqliteTable(
  "owner_registrations",
  {
    id: text("id").primaryKey(),
    pairId: text("pair_id")
      .notNull()
      .references(() => items.id),
    name: text("name").notNull(),
    email: text("email").notNull(),
    town: text("town").notNull(),
    country: text("country").notNull(),
    /** Consent to recall notices and service mail, as ticked on the form. */
    consent: integer("consent", { mode: "boolean" }).notNull(),
    tokenHash: text("token_hash").notNull().unique(),
    expiresAt: integer("expires_at", { mode: "timestamp_ms" }).notNull(),
    createdAt: integer("created_at", { mode: "timestamp_ms" }).notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
    /** Set once, with the owner it became, when the link is used (a trigger refuses any other change). */
    confirmedAt: integer("confirmed_at", { mode: "timestamp_ms" }),
    ownerId: text("owner_id").references(() => owners.id),
  },
  (t) => [index("owner_registrations_pair_idx").on(t.pairId, t.createdAt), index("owner_registrations_owner_idx").on(t.ownerId)],
);

/**
 * One-time links in messages to owners that withdraw their consent: each names the registration
 * it was sent for (pending or confirmed) or an owner on record. Only the token's hash is kept.
 */
export const ownerConsentLinks = sqliteTable(
  "owner_consent_links",
  {
    id: text("id").primaryKey(),
    tokenHash: text("token_hash").notNull(),
    registrationId: text("registration_id").references(() => ownerRegistrations.id),
    ownerId: text("owner_id").references(() => owners.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" }).notNull(),
    expiresAt: integer("expires_at", { mode: "timestamp_ms" }).notNull(),
    usedAt: integer("used_at", { mode: "timestamp_ms" }),
  },
  (t) => [
    uniqueIndex("owner_consent_links_token_unique").on(t.tokenHash),
    index("owner_consent_links_registration_idx").on(t.registrationId),
    // Exactly one of the two is named.
    check("owner_consent_links_one_subject", sql`(${t.registrationId} IS NULL) <> (${t.ownerId} IS NULL)`),
  ],
);

export type OwnerRegistration = typeof ownerRegistrations.$inferSelect;
