CREATE TABLE `case_reservations` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`case_id` text NOT NULL,
	`item_id` text NOT NULL,
	`side` text NOT NULL,
	`position` text NOT NULL,
	`event_id` integer NOT NULL,
	`created_at` integer NOT NULL,
	`ended_at` integer,
	`end_event_id` integer,
	`end_reason` text,
	FOREIGN KEY (`case_id`) REFERENCES `service_cases`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`item_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`end_event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "case_reservations_end_complete" CHECK(("case_reservations"."ended_at" IS NULL) = ("case_reservations"."end_event_id" IS NULL) AND ("case_reservations"."ended_at" IS NULL) = ("case_reservations"."end_reason" IS NULL))
);
--> statement-breakpoint
CREATE UNIQUE INDEX `case_reservations_reserved_once` ON `case_reservations` (`item_id`) WHERE "case_reservations"."ended_at" IS NULL;--> statement-breakpoint
CREATE UNIQUE INDEX `case_reservations_one_per_place` ON `case_reservations` (`case_id`,`side`,`position`) WHERE "case_reservations"."ended_at" IS NULL;--> statement-breakpoint
CREATE INDEX `case_reservations_case_idx` ON `case_reservations` (`case_id`);