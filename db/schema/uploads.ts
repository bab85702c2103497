import { sql } from "drizzle-orm";
import { check, index, integer, sqliteTable, text } from "drizzle-orm/sqlite-core";
import { users } from "./auth";
import { events } from "./events";

/**
 * A stored file (photo, response file, attachment). The bytes live outside `public/` under
 * `storedName`, a generated name; the type is what the content says it is, never the client's word.
 * Appended, never changed.
 */
export const uploads = sqliteTable(
  "uploads",
  {
    id: text("id").primaryKey(),
    /** What it belongs to, e.g. subject_kind "item" and the item's id. */
    subjectKind: text("subject_kind").notNull(),
    subjectId: text("subject_id").notNull(),
    /** What it is for: "photo" and later kinds. */
    purpose: text("purpose").notNull(),
    /** The file name the user gave, kept for display and downloads only; never used as a path. */
    originalName: text("original_name").notNull(),
    storedName: text("stored_name").notNull().unique(),
    mime: text("mime").notNull(),
    bytes: integer("bytes").notNull(),
    sha256: text("sha256").notNull(),
    width: integer("width"),
    height: integer("height"),
    /** Stored name of a small JPEG preview, for images. */
    thumbName: text("thumb_name"),
    caption: text("caption").notNull().default(""),
    uploadedBy: text("uploaded_by").references(() => users.id),
    createdAt: integer("created_at", { mode: "timestamp_ms" })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
    eventId: integer("event_id").references(() => events.id),
  },
  (t) => [index("uploads_subject_idx").on(t.subjectKind, t.subjectId, t.createdAt), check("uploads_bytes", sql`${t.bytes} > 0`)],
);

export type Upload = typeof uploads.$inferSelect;
