CREATE TABLE `flitches` (
	`item_id` text PRIMARY KEY NOT NULL,
	`finish_id` text NOT NULL,
	`log_reference` text NOT NULL,
	`supplier` text NOT NULL,
	`received_on` text NOT NULL,
	`leaf_thickness_mm` real NOT NULL,
	`leaf_count` integer NOT NULL,
	`event_id` integer NOT NULL,
	FOREIGN KEY (`item_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`finish_id`) REFERENCES `finishes`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "flitches_thickness" CHECK("flitches"."leaf_thickness_mm" > 0 AND "flitches"."leaf_thickness_mm" <= 5),
	CONSTRAINT "flitches_leaf_count" CHECK("flitches"."leaf_count" BETWEEN 1 AND 99),
	CONSTRAINT "flitches_received_on" CHECK("flitches"."received_on" GLOB '[0-9][0-9][0-9][0-9]-[0-9][0-9]-[0-9][0-9]')
);
--> statement-breakpoint
CREATE TABLE `leaf_allocations` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`leaf_id` text NOT NULL,
	`pair_id` text NOT NULL,
	`role` text NOT NULL,
	`cabinet_id` text,
	`position` text,
	`orientation` text,
	`started_at` integer NOT NULL,
	`event_id` integer NOT NULL,
	`ended_at` integer,
	`end_event_id` integer,
	`end_reason` text,
	FOREIGN KEY (`leaf_id`) REFERENCES `veneer_leaves`(`item_id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`pair_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`cabinet_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`end_event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "leaf_allocations_face_has_place" CHECK(("leaf_allocations"."role" = 'face') = ("leaf_allocations"."cabinet_id" IS NOT NULL AND "leaf_allocations"."position" IS NOT NULL AND "leaf_allocations"."orientation" IS NOT NULL)),
	CONSTRAINT "leaf_allocations_face_never_ends" CHECK("leaf_allocations"."role" = 'reserve' OR "leaf_allocations"."ended_at" IS NULL),
	CONSTRAINT "leaf_allocations_end_complete" CHECK(("leaf_allocations"."ended_at" IS NULL) = ("leaf_allocations"."end_event_id" IS NULL) AND ("leaf_allocations"."ended_at" IS NULL) = ("leaf_allocations"."end_reason" IS NULL))
);
--> statement-breakpoint
CREATE UNIQUE INDEX `leaf_allocations_face_once` ON `leaf_allocations` (`leaf_id`) WHERE "leaf_allocations"."role" = 'face';--> statement-breakpoint
CREATE UNIQUE INDEX `leaf_allocations_one_open` ON `leaf_allocations` (`leaf_id`) WHERE "leaf_allocations"."ended_at" IS NULL;--> statement-breakpoint
CREATE INDEX `leaf_allocations_pair_idx` ON `leaf_allocations` (`pair_id`);--> statement-breakpoint
CREATE TABLE `leaf_defects` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`leaf_id` text NOT NULL,
	`kind` text NOT NULL,
	`note` text DEFAULT '' NOT NULL,
	`position_mm` real,
	`event_id` integer NOT NULL,
	`cleared_event_id` integer,
	FOREIGN KEY (`leaf_id`) REFERENCES `veneer_leaves`(`item_id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`cleared_event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "leaf_defects_position" CHECK("leaf_defects"."position_mm" IS NULL OR "leaf_defects"."position_mm" >= 0)
);
--> statement-breakpoint
CREATE INDEX `leaf_defects_leaf_idx` ON `leaf_defects` (`leaf_id`);--> statement-breakpoint
CREATE TABLE `veneer_leaves` (
	`item_id` text PRIMARY KEY NOT NULL,
	`flitch_id` text NOT NULL,
	`seq` integer NOT NULL,
	`length_mm` real,
	`width_mm` real,
	`usable` integer DEFAULT true NOT NULL,
	FOREIGN KEY (`item_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`flitch_id`) REFERENCES `flitches`(`item_id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "veneer_leaves_seq" CHECK("veneer_leaves"."seq" >= 1),
	CONSTRAINT "veneer_leaves_length" CHECK("veneer_leaves"."length_mm" IS NULL OR "veneer_leaves"."length_mm" > 0),
	CONSTRAINT "veneer_leaves_width" CHECK("veneer_leaves"."width_mm" IS NULL OR "veneer_leaves"."width_mm" > 0)
);
--> statement-breakpoint
CREATE UNIQUE INDEX `veneer_leaves_flitch_seq` ON `veneer_leaves` (`flitch_id`,`seq`);--> statement-breakpoint
CREATE TABLE `uploads` (
	`id` text PRIMARY KEY NOT NULL,
	`subject_kind` text NOT NULL,
	`subject_id` text NOT NULL,
	`purpose` text NOT NULL,
	`original_name` text NOT NULL,
	`stored_name` text NOT NULL,
	`mime` text NOT NULL,
	`bytes` integer NOT NULL,
	`sha256` text NOT NULL,
	`width` integer,
	`height` integer,
	`thumb_name` text,
	`caption` text DEFAULT '' NOT NULL,
	`uploaded_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`event_id` integer,
	FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "uploads_bytes" CHECK("uploads"."bytes" > 0)
);
--> statement-breakpoint
CREATE UNIQUE INDEX `uploads_stored_name_unique` ON `uploads` (`stored_name`);--> statement-breakpoint
CREATE INDEX `uploads_subject_idx` ON `uploads` (`subject_kind`,`subject_id`,`created_at`);