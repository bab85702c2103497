CREATE TABLE `nonconformances` (
	`id` text PRIMARY KEY NOT NULL,
	`code` text NOT NULL,
	`pair_id` text NOT NULL,
	`record_id` integer,
	`cabinets` text NOT NULL,
	`seq` integer NOT NULL,
	`finding` text NOT NULL,
	`opened_at` integer NOT NULL,
	`opened_event_id` integer NOT NULL,
	`disposition` text,
	`rework_to_seq` integer,
	`scrap_cabinet_id` text,
	`reason` text,
	`approved_by` text,
	`dispositioned_at` integer,
	`disposition_event_id` integer,
	FOREIGN KEY (`pair_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`record_id`) REFERENCES `route_records`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`opened_event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`scrap_cabinet_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`approved_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`disposition_event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "nonconformances_disposition_complete" CHECK(("nonconformances"."disposition" IS NULL) = ("nonconformances"."dispositioned_at" IS NULL) AND ("nonconformances"."disposition" IS NULL) = ("nonconformances"."disposition_event_id" IS NULL) AND ("nonconformances"."disposition" IS NULL OR (length(trim(coalesce("nonconformances"."reason", ''))) > 0 AND "nonconformances"."approved_by" IS NOT NULL))),
	CONSTRAINT "nonconformances_rework_has_step" CHECK(("nonconformances"."disposition" = 'rework') = ("nonconformances"."rework_to_seq" IS NOT NULL)),
	CONSTRAINT "nonconformances_scrap_has_cabinet" CHECK(("nonconformances"."disposition" = 'scrap') = ("nonconformances"."scrap_cabinet_id" IS NOT NULL))
);
--> statement-breakpoint
CREATE UNIQUE INDEX `nonconformances_code_unique` ON `nonconformances` (`code`);--> statement-breakpoint
CREATE INDEX `nonconformances_pair_idx` ON `nonconformances` (`pair_id`);--> statement-breakpoint
CREATE INDEX `nonconformances_open_idx` ON `nonconformances` (`opened_at`) WHERE "nonconformances"."disposition" IS NULL;--> statement-breakpoint
CREATE TABLE `process_specs` (
	`id` text PRIMARY KEY NOT NULL,
	`model_id` text NOT NULL,
	`version` integer NOT NULL,
	`steps` text NOT NULL,
	`note` text DEFAULT '' NOT NULL,
	`created_by` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`event_id` integer,
	FOREIGN KEY (`model_id`) REFERENCES `models`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "process_specs_version" CHECK("process_specs"."version" >= 1)
);
--> statement-breakpoint
CREATE UNIQUE INDEX `process_specs_model_version` ON `process_specs` (`model_id`,`version`);--> statement-breakpoint
CREATE TABLE `route_records` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`pair_id` text NOT NULL,
	`spec_id` text NOT NULL,
	`seq` integer NOT NULL,
	`cabinets` text NOT NULL,
	`started_at` integer NOT NULL,
	`recorded_at` integer NOT NULL,
	`readings` text NOT NULL,
	`out_of_window` integer NOT NULL,
	`event_id` integer NOT NULL,
	FOREIGN KEY (`pair_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`spec_id`) REFERENCES `process_specs`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "route_records_started" CHECK("route_records"."started_at" <= "route_records"."recorded_at" + 60000)
);
--> statement-breakpoint
CREATE INDEX `route_records_pair_idx` ON `route_records` (`pair_id`,`id`);--> statement-breakpoint
CREATE TABLE `route_starts` (
	`pair_id` text PRIMARY KEY NOT NULL,
	`spec_id` text NOT NULL,
	`event_id` integer NOT NULL,
	FOREIGN KEY (`pair_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`spec_id`) REFERENCES `process_specs`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
