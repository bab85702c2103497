CREATE TABLE `items` (
	`id` text PRIMARY KEY NOT NULL,
	`kind` text NOT NULL,
	`identity` text NOT NULL,
	`model_id` text,
	`finish_id` text,
	`part_type` text,
	`state` text NOT NULL,
	`dealer_id` text,
	`attrs` text DEFAULT '{}' NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`created_event_id` integer,
	FOREIGN KEY (`model_id`) REFERENCES `models`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`finish_id`) REFERENCES `finishes`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`dealer_id`) REFERENCES `dealers`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `items_identity_unique` ON `items` (`identity`);--> statement-breakpoint
CREATE INDEX `items_kind_idx` ON `items` (`kind`,`created_at`);--> statement-breakpoint
CREATE INDEX `items_model_idx` ON `items` (`model_id`);--> statement-breakpoint
CREATE TABLE `links` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`parent_id` text NOT NULL,
	`child_id` text NOT NULL,
	`position` text NOT NULL,
	`shared` integer DEFAULT false NOT NULL,
	`started_at` integer NOT NULL,
	`ended_at` integer,
	`fit_event_id` integer NOT NULL,
	`remove_event_id` integer,
	FOREIGN KEY (`parent_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`child_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`fit_event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`remove_event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "links_not_self" CHECK("links"."parent_id" <> "links"."child_id"),
	CONSTRAINT "links_end_after_start" CHECK("links"."ended_at" IS NULL OR "links"."ended_at" >= "links"."started_at"),
	CONSTRAINT "links_end_has_event" CHECK(("links"."ended_at" IS NULL) = ("links"."remove_event_id" IS NULL))
);
--> statement-breakpoint
CREATE UNIQUE INDEX `links_one_parent` ON `links` (`child_id`) WHERE "links"."ended_at" IS NULL AND "links"."shared" = 0;--> statement-breakpoint
CREATE UNIQUE INDEX `links_one_per_position` ON `links` (`parent_id`,`position`) WHERE "links"."ended_at" IS NULL AND "links"."shared" = 0;--> statement-breakpoint
CREATE INDEX `links_parent_idx` ON `links` (`parent_id`,`started_at`);--> statement-breakpoint
CREATE INDEX `links_child_idx` ON `links` (`child_id`,`started_at`);--> statement-breakpoint
CREATE TABLE `owners` (
	`id` text PRIMARY KEY NOT NULL,
	`name` text NOT NULL,
	`email` text,
	`town` text NOT NULL,
	`country` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL
);
--> statement-breakpoint
CREATE TABLE `ownerships` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`owner_id` text NOT NULL,
	`item_id` text NOT NULL,
	`since` integer NOT NULL,
	`event_id` integer,
	FOREIGN KEY (`owner_id`) REFERENCES `owners`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`item_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `ownerships_item_idx` ON `ownerships` (`item_id`);--> statement-breakpoint
CREATE INDEX `ownerships_owner_idx` ON `ownerships` (`owner_id`);--> statement-breakpoint
CREATE TABLE `serial_sequences` (
	`kind` text NOT NULL,
	`year` integer NOT NULL,
	`last` integer NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `serial_sequences_pk` ON `serial_sequences` (`kind`,`year`);