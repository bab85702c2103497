CREATE TABLE `case_findings` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`case_id` text NOT NULL,
	`side` text NOT NULL,
	`position` text NOT NULL,
	`finding` text NOT NULL,
	`event_id` integer NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`case_id`) REFERENCES `service_cases`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `case_findings_case_idx` ON `case_findings` (`case_id`,`id`);--> statement-breakpoint
CREATE TABLE `service_cases` (
	`id` text PRIMARY KEY NOT NULL,
	`code` text NOT NULL,
	`item_id` text NOT NULL,
	`pair_id` text NOT NULL,
	`partner_id` text,
	`dealer_id` text,
	`owner_id` text,
	`returned_by` text NOT NULL,
	`received_on` text NOT NULL,
	`symptom` text NOT NULL,
	`state` text DEFAULT 'received' NOT NULL,
	`opened_at` integer NOT NULL,
	`event_id` integer NOT NULL,
	FOREIGN KEY (`item_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`pair_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`partner_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`dealer_id`) REFERENCES `dealers`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`owner_id`) REFERENCES `owners`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "service_cases_received_on" CHECK("service_cases"."received_on" GLOB '[0-9][0-9][0-9][0-9]-[0-9][0-9]-[0-9][0-9]'),
	CONSTRAINT "service_cases_symptom" CHECK(length(trim("service_cases"."symptom")) BETWEEN 1 AND 2000)
);
--> statement-breakpoint
CREATE UNIQUE INDEX `service_cases_code_unique` ON `service_cases` (`code`);--> statement-breakpoint
CREATE UNIQUE INDEX `service_cases_one_open_per_pair` ON `service_cases` (`pair_id`) WHERE "service_cases"."state" NOT IN ('closed', 'cancelled');--> statement-breakpoint
CREATE INDEX `service_cases_state_idx` ON `service_cases` (`state`,`opened_at`);--> statement-breakpoint
ALTER TABLE `models` ADD `warranty_months` integer DEFAULT 24 NOT NULL CHECK (`warranty_months` BETWEEN 0 AND 600);