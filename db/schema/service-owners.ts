import { index, integer, sqliteTable, text } from "drizzle-orm/sqlite-core";
import { events } from "./events";
import { owners } from "./genealogy";

/**
 * An owner's word on being contacted by the workshop, appended each time it is given or withdrawn:
 * the newest row counts, and the older ones stay as the record of what was said when.
 */
export const ownerConsents = sqliteTable(
  "owner_consents",
  {
    id: integer("id").primaryKey({ autoIncrement: true }),
    ownerId: text("owner_id")
      .notNull()
      .references(() => owners.id),
    consent: integer("consent", { mode: "boolean" }).notNull(),
    at: integer("at", { mode: "timestamp_ms" }).notNull(),
    eventId: integer("event_id")
      .notNull()
      .references(() => events.id),
  },
  (t) => [index("owner_consents_owner_idx").on(t.ownerId, t.id)],
);

export type OwnerConsent = typeof ownerConsents.$inferSelect;
