CREATE TABLE `auth_tokens` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`purpose` text NOT NULL,
	`token_hash` text NOT NULL,
	`expires_at` integer NOT NULL,
	`used_at` integer,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `auth_tokens_token_hash_unique` ON `auth_tokens` (`token_hash`);--> statement-breakpoint
CREATE INDEX `auth_tokens_user_idx` ON `auth_tokens` (`user_id`);--> statement-breakpoint
CREATE TABLE `sessions` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`expires_at` integer NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `sessions_user_idx` ON `sessions` (`user_id`);--> statement-breakpoint
CREATE TABLE `sign_in_attempts` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`email` text NOT NULL,
	`address` text NOT NULL,
	`ok` integer NOT NULL,
	`at` integer NOT NULL
);
--> statement-breakpoint
CREATE INDEX `sign_in_attempts_email_idx` ON `sign_in_attempts` (`email`,`at`);--> statement-breakpoint
CREATE INDEX `sign_in_attempts_address_idx` ON `sign_in_attempts` (`address`,`at`);--> statement-breakpoint
CREATE TABLE `user_roles` (
	`user_id` text NOT NULL,
	`role` text NOT NULL,
	PRIMARY KEY(`user_id`, `role`),
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `users` (
	`id` text PRIMARY KEY NOT NULL,
	`email` text NOT NULL,
	`name` text NOT NULL,
	`password_hash` text,
	`active` integer DEFAULT true NOT NULL,
	`demo` integer DEFAULT false NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `users_email_unique` ON `users` (`email`);--> statement-breakpoint
CREATE TABLE `dealers` (
	`id` text PRIMARY KEY NOT NULL,
	`code` text NOT NULL,
	`name` text NOT NULL,
	`city` text NOT NULL,
	`country` text NOT NULL,
	`email` text NOT NULL,
	`active` integer DEFAULT true NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `dealers_code_unique` ON `dealers` (`code`);--> statement-breakpoint
CREATE TABLE `finishes` (
	`id` text PRIMARY KEY NOT NULL,
	`code` text NOT NULL,
	`name` text NOT NULL,
	`kind` text NOT NULL,
	`detail` text DEFAULT '' NOT NULL,
	`active` integer DEFAULT true NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `finishes_code_unique` ON `finishes` (`code`);--> statement-breakpoint
CREATE TABLE `model_positions` (
	`model_id` text NOT NULL,
	`position` text NOT NULL,
	`part_type` text NOT NULL,
	`count` integer DEFAULT 1 NOT NULL,
	PRIMARY KEY(`model_id`, `position`),
	FOREIGN KEY (`model_id`) REFERENCES `models`(`id`) ON UPDATE no action ON DELETE cascade,
	CONSTRAINT "model_positions_count" CHECK("model_positions"."count" >= 1)
);
--> statement-breakpoint
CREATE TABLE `model_tolerances` (
	`model_id` text NOT NULL,
	`part_type` text NOT NULL,
	`mismatch_limit_db` real NOT NULL,
	PRIMARY KEY(`model_id`, `part_type`),
	FOREIGN KEY (`model_id`) REFERENCES `models`(`id`) ON UPDATE no action ON DELETE cascade,
	CONSTRAINT "model_tolerances_positive" CHECK("model_tolerances"."mismatch_limit_db" > 0)
);
--> statement-breakpoint
CREATE TABLE `models` (
	`id` text PRIMARY KEY NOT NULL,
	`code` text NOT NULL,
	`name` text NOT NULL,
	`leaves_per_face` integer NOT NULL,
	`min_leaf_length_mm` real NOT NULL,
	`min_leaf_width_mm` real NOT NULL,
	`pair_response_limit_db` real NOT NULL,
	`response_min_hz` real NOT NULL,
	`response_max_hz` real NOT NULL,
	`pair_gtin` text NOT NULL,
	`active` integer DEFAULT true NOT NULL,
	CONSTRAINT "models_code_format" CHECK("models"."code" GLOB '[A-Z0-9][A-Z0-9]*' AND length("models"."code") BETWEEN 2 AND 4),
	CONSTRAINT "models_leaves_positive" CHECK("models"."leaves_per_face" >= 1),
	CONSTRAINT "models_range" CHECK("models"."response_min_hz" > 0 AND "models"."response_max_hz" > "models"."response_min_hz"),
	CONSTRAINT "models_gtin_format" CHECK(length("models"."pair_gtin") = 14 AND "models"."pair_gtin" GLOB '[0-9]*' AND "models"."pair_gtin" NOT GLOB '*[^0-9]*')
);
--> statement-breakpoint
CREATE UNIQUE INDEX `models_code_unique` ON `models` (`code`);--> statement-breakpoint
CREATE TABLE `events` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`actor_id` text,
	`station` text NOT NULL,
	`type` text NOT NULL,
	`subject_kind` text NOT NULL,
	`subject_id` text NOT NULL,
	`data` text DEFAULT '{}' NOT NULL,
	`reason` text,
	`corrects_id` integer,
	FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`corrects_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "events_correction_has_reason" CHECK("events"."corrects_id" IS NULL OR length(trim(coalesce("events"."reason", ''))) > 0)
);
--> statement-breakpoint
CREATE INDEX `events_subject_idx` ON `events` (`subject_kind`,`subject_id`,`at`);--> statement-breakpoint
CREATE INDEX `events_at_idx` ON `events` (`at`);--> statement-breakpoint
CREATE TABLE `mail_attempts` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`outbox_id` integer NOT NULL,
	`at` integer NOT NULL,
	`ok` integer NOT NULL,
	`detail` text NOT NULL,
	FOREIGN KEY (`outbox_id`) REFERENCES `outbox`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `mail_attempts_outbox_idx` ON `mail_attempts` (`outbox_id`);--> statement-breakpoint
CREATE TABLE `outbox` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`event_id` integer,
	`to` text NOT NULL,
	`subject` text NOT NULL,
	`text` text NOT NULL,
	`html` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `outbox_created_idx` ON `outbox` (`created_at`);