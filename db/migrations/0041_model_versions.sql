CREATE TABLE `model_crossover_positions` (
	`model_id` text NOT NULL,
	`position` text NOT NULL,
	`count` integer DEFAULT 1 NOT NULL,
	PRIMARY KEY(`model_id`, `position`),
	FOREIGN KEY (`model_id`) REFERENCES `models`(`id`) ON UPDATE no action ON DELETE cascade,
	CONSTRAINT "model_crossover_positions_count" CHECK("model_crossover_positions"."count" >= 1),
	CONSTRAINT "model_crossover_positions_code" CHECK("model_crossover_positions"."position" GLOB 'XO*' AND length("model_crossover_positions"."position") BETWEEN 2 AND 12)
);
--> statement-breakpoint
CREATE TABLE `item_model_versions` (
	`item_id` text PRIMARY KEY NOT NULL,
	`model_version_id` text NOT NULL,
	FOREIGN KEY (`item_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`model_version_id`) REFERENCES `model_versions`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE TABLE `model_versions` (
	`id` text PRIMARY KEY NOT NULL,
	`model_id` text NOT NULL,
	`version` integer NOT NULL,
	`spec` text NOT NULL,
	`note` text DEFAULT '' NOT NULL,
	`created_by` text,
	`created_at` integer NOT NULL,
	`event_id` integer,
	FOREIGN KEY (`model_id`) REFERENCES `models`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "model_versions_positive" CHECK("model_versions"."version" >= 1)
);
--> statement-breakpoint
CREATE UNIQUE INDEX `model_versions_model_version` ON `model_versions` (`model_id`,`version`);--> statement-breakpoint
ALTER TABLE `finishes` ADD `botanical_name` text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE `finishes` ADD `cut` text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE `finishes` ADD `colour_ref` text DEFAULT '' NOT NULL;