CREATE TABLE `route_corrections` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`record_id` integer NOT NULL,
	`pair_id` text NOT NULL,
	`readings` text NOT NULL,
	`changed` text NOT NULL,
	`started_at` integer NOT NULL,
	`out_of_window` integer NOT NULL,
	`reason` text NOT NULL,
	`corrected_by` text NOT NULL,
	`corrected_at` integer NOT NULL,
	`event_id` integer NOT NULL,
	FOREIGN KEY (`record_id`) REFERENCES `route_records`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`pair_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`corrected_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "route_corrections_reason" CHECK(length(trim("route_corrections"."reason")) >= 5),
	CONSTRAINT "route_corrections_started" CHECK("route_corrections"."started_at" <= "route_corrections"."corrected_at" + 60000)
);
--> statement-breakpoint
CREATE INDEX `route_corrections_record_idx` ON `route_corrections` (`record_id`,`id`);--> statement-breakpoint
CREATE INDEX `route_corrections_pair_idx` ON `route_corrections` (`pair_id`);