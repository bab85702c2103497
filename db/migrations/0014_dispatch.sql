CREATE TABLE `carton_locations` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`carton_id` text NOT NULL,
	`location` text NOT NULL,
	`event_id` integer NOT NULL,
	`at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`carton_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `carton_locations_carton_idx` ON `carton_locations` (`carton_id`,`id`);--> statement-breakpoint
CREATE TABLE `certificates` (
	`id` text PRIMARY KEY NOT NULL,
	`pair_id` text NOT NULL,
	`code` text NOT NULL,
	`issued_at` integer NOT NULL,
	`event_id` integer NOT NULL,
	FOREIGN KEY (`pair_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `certificates_pair_id_unique` ON `certificates` (`pair_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `certificates_code_unique` ON `certificates` (`code`);--> statement-breakpoint
CREATE TABLE `final_tests` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`pair_id` text NOT NULL,
	`left_response_id` integer NOT NULL,
	`right_response_id` integer NOT NULL,
	`limit_db` real NOT NULL,
	`max_diff_db` real NOT NULL,
	`worst_band` text NOT NULL,
	`pass` integer NOT NULL,
	`event_id` integer NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`pair_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`left_response_id`) REFERENCES `responses`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`right_response_id`) REFERENCES `responses`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `final_tests_pair_idx` ON `final_tests` (`pair_id`,`id`);--> statement-breakpoint
CREATE TABLE `packing_items` (
	`model_id` text NOT NULL,
	`position` integer NOT NULL,
	`label` text NOT NULL,
	FOREIGN KEY (`model_id`) REFERENCES `models`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `packing_items_pk` ON `packing_items` (`model_id`,`position`);--> statement-breakpoint
CREATE TABLE `shipment_details` (
	`item_id` text PRIMARY KEY NOT NULL,
	`dealer_id` text NOT NULL,
	`shipped_on` text NOT NULL,
	`carrier` text NOT NULL,
	`tracking` text NOT NULL,
	`event_id` integer NOT NULL,
	FOREIGN KEY (`item_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`dealer_id`) REFERENCES `dealers`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "shipment_details_date" CHECK("shipment_details"."shipped_on" GLOB '[0-9][0-9][0-9][0-9]-[0-9][0-9]-[0-9][0-9]')
);
--> statement-breakpoint
ALTER TABLE `outbox` ADD `attachments` text DEFAULT '[]' NOT NULL;