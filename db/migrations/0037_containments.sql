CREATE TABLE `containment_items` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`containment_id` text NOT NULL,
	`item_id` text NOT NULL,
	`kind` text NOT NULL,
	`identity` text NOT NULL,
	`pair_id` text,
	`group` text NOT NULL,
	`item_state` text NOT NULL,
	`dealer_id` text,
	`state` text DEFAULT 'open' NOT NULL,
	`case_id` text,
	`event_id` integer NOT NULL,
	FOREIGN KEY (`containment_id`) REFERENCES `containments`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`item_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`pair_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`dealer_id`) REFERENCES `dealers`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`case_id`) REFERENCES `service_cases`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `containment_items_once` ON `containment_items` (`containment_id`,`item_id`);--> statement-breakpoint
CREATE INDEX `containment_items_item_idx` ON `containment_items` (`item_id`,`state`);--> statement-breakpoint
CREATE INDEX `containment_items_group_idx` ON `containment_items` (`containment_id`,`group`,`identity`);--> statement-breakpoint
CREATE INDEX `containment_items_dealer_idx` ON `containment_items` (`containment_id`,`dealer_id`);--> statement-breakpoint
CREATE TABLE `containment_notices` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`containment_id` text NOT NULL,
	`dealer_id` text,
	`owner_id` text,
	`outbox_id` integer NOT NULL,
	`serials` integer NOT NULL,
	`event_id` integer NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`containment_id`) REFERENCES `containments`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`dealer_id`) REFERENCES `dealers`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`owner_id`) REFERENCES `owners`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`outbox_id`) REFERENCES `outbox`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "containment_notices_one_recipient" CHECK(("containment_notices"."dealer_id" IS NULL) <> ("containment_notices"."owner_id" IS NULL))
);
--> statement-breakpoint
CREATE UNIQUE INDEX `containment_notices_dealer_once` ON `containment_notices` (`containment_id`,`dealer_id`) WHERE "containment_notices"."dealer_id" IS NOT NULL;--> statement-breakpoint
CREATE UNIQUE INDEX `containment_notices_owner_once` ON `containment_notices` (`containment_id`,`owner_id`) WHERE "containment_notices"."owner_id" IS NOT NULL;--> statement-breakpoint
CREATE TABLE `containments` (
	`id` text PRIMARY KEY NOT NULL,
	`code` text NOT NULL,
	`target_item_id` text,
	`target_label` text NOT NULL,
	`station` text,
	`window_from` integer,
	`window_to` integer,
	`reason` text NOT NULL,
	`severity` text NOT NULL,
	`raised_at` integer NOT NULL,
	`raised_by` text NOT NULL,
	`event_id` integer NOT NULL,
	`closed_at` integer,
	`close_reason` text,
	`approved_by` text,
	`close_event_id` integer,
	FOREIGN KEY (`target_item_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`raised_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`approved_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`close_event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "containments_target" CHECK(("containments"."target_item_id" IS NOT NULL) OR ("containments"."station" IS NOT NULL AND "containments"."window_from" IS NOT NULL AND "containments"."window_to" IS NOT NULL AND "containments"."window_to" >= "containments"."window_from")),
	CONSTRAINT "containments_reason" CHECK(length(trim("containments"."reason")) BETWEEN 1 AND 2000),
	CONSTRAINT "containments_closed_complete" CHECK(("containments"."closed_at" IS NULL) = ("containments"."close_event_id" IS NULL) AND ("containments"."closed_at" IS NULL) = ("containments"."approved_by" IS NULL) AND ("containments"."closed_at" IS NULL) = ("containments"."close_reason" IS NULL))
);
--> statement-breakpoint
CREATE UNIQUE INDEX `containments_code_unique` ON `containments` (`code`);--> statement-breakpoint
CREATE INDEX `containments_raised_idx` ON `containments` (`raised_at`);