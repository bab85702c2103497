CREATE TABLE `certificate_prints` (
	`id` text PRIMARY KEY NOT NULL,
	`certificate_id` text NOT NULL,
	`original` integer NOT NULL,
	`actor_id` text,
	`event_id` integer NOT NULL,
	`printed_at` integer NOT NULL,
	FOREIGN KEY (`certificate_id`) REFERENCES `certificates`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `certificate_prints_event_id_unique` ON `certificate_prints` (`event_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `certificate_prints_one_original` ON `certificate_prints` (`certificate_id`) WHERE "certificate_prints"."original" = 1;--> statement-breakpoint
CREATE INDEX `certificate_prints_certificate_idx` ON `certificate_prints` (`certificate_id`,`printed_at`);