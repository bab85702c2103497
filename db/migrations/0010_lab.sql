CREATE TABLE `batch_units` (
	`item_id` text PRIMARY KEY NOT NULL,
	`batch_id` text NOT NULL,
	`maker_serial` text,
	FOREIGN KEY (`item_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`batch_id`) REFERENCES `unit_batches`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `batch_units_batch_idx` ON `batch_units` (`batch_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `batch_units_maker_serial` ON `batch_units` (`batch_id`,`maker_serial`) WHERE "batch_units"."maker_serial" IS NOT NULL;--> statement-breakpoint
CREATE TABLE `crossover_parts` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`crossover_id` text NOT NULL,
	`position` text NOT NULL,
	`lot_id` text NOT NULL,
	`part_number` text NOT NULL,
	`nominal` real NOT NULL,
	`unit` text NOT NULL,
	`tolerance` text NOT NULL,
	`reading` real,
	`event_id` integer NOT NULL,
	FOREIGN KEY (`crossover_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`lot_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "crossover_parts_nominal" CHECK("crossover_parts"."nominal" > 0)
);
--> statement-breakpoint
CREATE UNIQUE INDEX `crossover_parts_position` ON `crossover_parts` (`crossover_id`,`position`);--> statement-breakpoint
CREATE TABLE `machine_tokens` (
	`id` text PRIMARY KEY NOT NULL,
	`name` text NOT NULL,
	`token_hash` text NOT NULL,
	`prefix` text NOT NULL,
	`scope` text NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`event_id` integer,
	`revoked_at` integer,
	`revoked_by` text,
	`revoke_event_id` integer,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`revoked_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`revoke_event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "machine_tokens_revoke_complete" CHECK(("machine_tokens"."revoked_at" IS NULL) = ("machine_tokens"."revoke_event_id" IS NULL))
);
--> statement-breakpoint
CREATE UNIQUE INDEX `machine_tokens_token_hash_unique` ON `machine_tokens` (`token_hash`);--> statement-breakpoint
CREATE TABLE `matched_sets` (
	`id` text PRIMARY KEY NOT NULL,
	`code` text NOT NULL,
	`kind` text NOT NULL,
	`part_type` text,
	`batch_id` text,
	`model_id` text,
	`cost` real NOT NULL,
	`max_diff_db` real NOT NULL,
	`limit_db` real NOT NULL,
	`event_id` integer NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`batch_id`) REFERENCES `unit_batches`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`model_id`) REFERENCES `models`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `matched_sets_code_unique` ON `matched_sets` (`code`);--> statement-breakpoint
CREATE INDEX `matched_sets_batch_idx` ON `matched_sets` (`batch_id`);--> statement-breakpoint
CREATE TABLE `responses` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`item_id` text NOT NULL,
	`purpose` text DEFAULT 'unit' NOT NULL,
	`points` text NOT NULL,
	`file_name` text,
	`source` text NOT NULL,
	`event_id` integer NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`item_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `responses_item_idx` ON `responses` (`item_id`,`id`);--> statement-breakpoint
CREATE TABLE `set_members` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`set_id` text NOT NULL,
	`item_id` text NOT NULL,
	`side` text NOT NULL,
	`ended_at` integer,
	`end_event_id` integer,
	`end_reason` text,
	FOREIGN KEY (`set_id`) REFERENCES `matched_sets`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`item_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`end_event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "set_members_end_complete" CHECK(("set_members"."ended_at" IS NULL) = ("set_members"."end_event_id" IS NULL) AND ("set_members"."ended_at" IS NULL) = ("set_members"."end_reason" IS NULL))
);
--> statement-breakpoint
CREATE UNIQUE INDEX `set_members_reserved_once` ON `set_members` (`item_id`) WHERE "set_members"."ended_at" IS NULL;--> statement-breakpoint
CREATE UNIQUE INDEX `set_members_side` ON `set_members` (`set_id`,`side`);--> statement-breakpoint
CREATE INDEX `set_members_set_idx` ON `set_members` (`set_id`);--> statement-breakpoint
CREATE TABLE `ts_params` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`item_id` text NOT NULL,
	`fs_hz` real,
	`qts` real,
	`qes` real,
	`qms` real,
	`re_ohm` real,
	`vas_l` real,
	`sensitivity_db` real,
	`source` text NOT NULL,
	`event_id` integer NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`item_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `ts_params_item_idx` ON `ts_params` (`item_id`,`id`);--> statement-breakpoint
CREATE TABLE `unit_batches` (
	`id` text PRIMARY KEY NOT NULL,
	`code` text NOT NULL,
	`part_type` text NOT NULL,
	`part_number` text NOT NULL,
	`maker` text NOT NULL,
	`lot` text NOT NULL,
	`received_on` text NOT NULL,
	`event_id` integer NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "unit_batches_received_on" CHECK("unit_batches"."received_on" GLOB '[0-9][0-9][0-9][0-9]-[0-9][0-9]-[0-9][0-9]')
);
--> statement-breakpoint
CREATE UNIQUE INDEX `unit_batches_code_unique` ON `unit_batches` (`code`);