CREATE TABLE `carton_ssccs` (
	`carton_id` text PRIMARY KEY NOT NULL,
	`sscc` text NOT NULL,
	`extension` integer NOT NULL,
	`company_prefix` text NOT NULL,
	`serial_reference` integer NOT NULL,
	`assigned_at` integer NOT NULL,
	FOREIGN KEY (`carton_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "carton_ssccs_digits" CHECK(length("carton_ssccs"."sscc") = 18 AND "carton_ssccs"."sscc" NOT GLOB '*[^0-9]*')
);
--> statement-breakpoint
CREATE UNIQUE INDEX `carton_ssccs_sscc_unique` ON `carton_ssccs` (`sscc`);--> statement-breakpoint
CREATE UNIQUE INDEX `carton_ssccs_reference` ON `carton_ssccs` (`extension`,`company_prefix`,`serial_reference`);--> statement-breakpoint
ALTER TABLE `packing_items` ADD `code` text;