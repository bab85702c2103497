-- secure_delete makes SQLite overwrite what is deleted here (the raw session ids) rather than leave it in free pages.
PRAGMA secure_delete = ON;
--> statement-breakpoint
CREATE TABLE `mail_secrets` (
	`outbox_id` integer PRIMARY KEY NOT NULL,
	`values` text NOT NULL,
	FOREIGN KEY (`outbox_id`) REFERENCES `outbox`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
ALTER TABLE `auth_tokens` ADD `revoked_at` integer;--> statement-breakpoint
PRAGMA foreign_keys=OFF;--> statement-breakpoint
CREATE TABLE `__new_sessions` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`expires_at` integer NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade,
	CONSTRAINT "sessions_id_is_hash" CHECK(length("__new_sessions"."id") = 64 AND "__new_sessions"."id" NOT GLOB '*[^0-9a-f]*')
);
--> statement-breakpoint
-- Every session ends here: the old rows held raw ids, and the table now holds only their SHA-256.
DROP TABLE `sessions`;--> statement-breakpoint
ALTER TABLE `__new_sessions` RENAME TO `sessions`;--> statement-breakpoint
PRAGMA foreign_keys=ON;--> statement-breakpoint
CREATE INDEX `sessions_user_idx` ON `sessions` (`user_id`);