CREATE TABLE `model_trim_positions` (
	`model_id` text NOT NULL,
	`position` text NOT NULL,
	`label` text NOT NULL,
	`count` integer DEFAULT 1 NOT NULL,
	PRIMARY KEY(`model_id`, `position`),
	FOREIGN KEY (`model_id`) REFERENCES `models`(`id`) ON UPDATE no action ON DELETE cascade,
	CONSTRAINT "model_trim_positions_count" CHECK("model_trim_positions"."count" >= 1),
	CONSTRAINT "model_trim_positions_code" CHECK("model_trim_positions"."position" GLOB '[A-Z][A-Z0-9-]*' AND length("model_trim_positions"."position") BETWEEN 2 AND 12)
);
--> statement-breakpoint
DROP INDEX `process_specs_model_version`;--> statement-breakpoint
ALTER TABLE `process_specs` ADD `route_kind` text DEFAULT 'cabinet' NOT NULL;--> statement-breakpoint
CREATE UNIQUE INDEX `process_specs_model_kind_version` ON `process_specs` (`model_id`,`route_kind`,`version`);--> statement-breakpoint
ALTER TABLE `dealers` ADD `address` text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE `dealers` ADD `postcode` text DEFAULT '' NOT NULL;