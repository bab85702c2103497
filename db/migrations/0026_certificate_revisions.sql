CREATE TABLE `certificate_revision_prints` (
	`id` text PRIMARY KEY NOT NULL,
	`revision_id` text NOT NULL,
	`original` integer NOT NULL,
	`actor_id` text,
	`event_id` integer NOT NULL,
	`printed_at` integer NOT NULL,
	FOREIGN KEY (`revision_id`) REFERENCES `certificate_revisions`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `certificate_revision_prints_event_id_unique` ON `certificate_revision_prints` (`event_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `certificate_revision_prints_one_original` ON `certificate_revision_prints` (`revision_id`) WHERE "certificate_revision_prints"."original" = 1;--> statement-breakpoint
CREATE INDEX `certificate_revision_prints_revision_idx` ON `certificate_revision_prints` (`revision_id`,`printed_at`);--> statement-breakpoint
CREATE TABLE `certificate_revisions` (
	`id` text PRIMARY KEY NOT NULL,
	`certificate_id` text NOT NULL,
	`revision` integer NOT NULL,
	`code` text NOT NULL,
	`case_id` text NOT NULL,
	`final_test_id` integer NOT NULL,
	`repair_line` text NOT NULL,
	`replaced` text NOT NULL,
	`repaired_at` integer NOT NULL,
	`issued_at` integer NOT NULL,
	`event_id` integer NOT NULL,
	FOREIGN KEY (`certificate_id`) REFERENCES `certificates`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`case_id`) REFERENCES `service_cases`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`final_test_id`) REFERENCES `final_tests`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "certificate_revisions_revision" CHECK("certificate_revisions"."revision" >= 2),
	CONSTRAINT "certificate_revisions_line" CHECK(length(trim("certificate_revisions"."repair_line")) BETWEEN 1 AND 300)
);
--> statement-breakpoint
CREATE UNIQUE INDEX `certificate_revisions_code_unique` ON `certificate_revisions` (`code`);--> statement-breakpoint
CREATE UNIQUE INDEX `certificate_revisions_final_test_id_unique` ON `certificate_revisions` (`final_test_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `certificate_revisions_event_id_unique` ON `certificate_revisions` (`event_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `certificate_revisions_number` ON `certificate_revisions` (`certificate_id`,`revision`);--> statement-breakpoint
CREATE INDEX `certificate_revisions_case_idx` ON `certificate_revisions` (`case_id`);