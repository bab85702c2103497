import { sql } from "drizzle-orm";
import { check, index, integer, primaryKey, sqliteTable, text } from "drizzle-orm/sqlite-core";

/** People who sign in. A user without a password hash has an invite still open. */
export const users = sqliteTable("users", {
  id: text("id").primaryKey(),
  email: text("email").notNull().unique(),
  name: text("name").notNull(),
  passwordHash: text("password_hash"),
  active: integer("active", { mode: "boolean" }).notNull().default(true),
  /** Demo users are marked so the seed can tell a demo database from a real one. */
  demo: integer("demo", { mode: "boolean" }).notNull().default(false),
  createdAt: integer("created_at", { mode: "timestamp_ms" })
    .notNull()
    .default(sql`(unixepoch('subsec') * 1000)`),
});

/** A user may hold several roles; one row per role held. */
export const userRoles = sqliteTable(
  "user_roles",
  {
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    role: text("role").notNull(),
  },
  (t) => [primaryKey({ columns: [t.userId, t.role] })],
);

/**
 * Lucia's session table. expires_at and created_at are Unix seconds (the adapter's format).
 * `id` holds the SHA-256 (hex) of the session id, never the id itself: the cookie carries the id,
 * so a copy of this table opens no session (lib/auth/lucia.ts hashes on the way in). The check
 * refuses anything that is not a hash, so a raw id cannot be stored by mistake.
 */
export const sessions = sqliteTable(
  "sessions",
  {
    id: text("id").primaryKey(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    expiresAt: integer("expires_at").notNull(),
    /** When the session began: the absolute expiry counts from here. */
    createdAt: integer("created_at").notNull(),
  },
  (t) => [index("sessions_user_idx").on(t.userId), check("sessions_id_is_hash", sql`length(${t.id}) = 64 AND ${t.id} NOT GLOB '*[^0-9a-f]*'`)],
);

/**
 * One-time tokens for invites and password resets; only a hash of the token is kept. A token is
 * usable while it is unused, unrevoked and unexpired: a newer reset link, or any link of the user
 * spent, revokes the others.
 */
export const authTokens = sqliteTable(
  "auth_tokens",
  {
    id: text("id").primaryKey(),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    purpose: text("purpose", { enum: ["invite", "reset"] }).notNull(),
    tokenHash: text("token_hash").notNull().unique(),
    expiresAt: integer("expires_at", { mode: "timestamp_ms" }).notNull(),
    usedAt: integer("used_at", { mode: "timestamp_ms" }),
    revokedAt: integer("revoked_at", { mode: "timestamp_ms" }),
    createdAt: integer("created_at", { mode: "timestamp_ms" })
      .notNull()
      .default(sql`(unixepoch('subsec') * 1000)`),
  },
  (t) => [index("auth_tokens_user_idx").on(t.userId)],
);

export type User = typeof users.$inferSelect;
