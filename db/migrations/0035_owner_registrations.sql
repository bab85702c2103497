CREATE TABLE `owner_consent_links` (
	`id` text PRIMARY KEY NOT NULL,
	`token_hash` text NOT NULL,
	`registration_id` text,
	`owner_id` text,
	`created_at` integer NOT NULL,
	`expires_at` integer NOT NULL,
	`used_at` integer,
	FOREIGN KEY (`registration_id`) REFERENCES `owner_registrations`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`owner_id`) REFERENCES `owners`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "owner_consent_links_one_subject" CHECK(("owner_consent_links"."registration_id" IS NULL) <> ("owner_consent_links"."owner_id" IS NULL))
);
--> statement-breakpoint
CREATE UNIQUE INDEX `owner_consent_links_token_unique` ON `owner_consent_links` (`token_hash`);--> statement-breakpoint
CREATE INDEX `owner_consent_links_registration_idx` ON `owner_consent_links` (`registration_id`);--> statement-breakpoint
CREATE TABLE `owner_registrations` (
	`id` text PRIMARY KEY NOT NULL,
	`pair_id` text NOT NULL,
	`name` text NOT NULL,
	`email` text NOT NULL,
	`town` text NOT NULL,
	`country` text NOT NULL,
	`consent` integer NOT NULL,
	`token_hash` text NOT NULL,
	`expires_at` integer NOT NULL,
	`created_at` integer NOT NULL,
	`event_id` integer NOT NULL,
	`confirmed_at` integer,
	`owner_id` text,
	FOREIGN KEY (`pair_id`) REFERENCES `items`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`owner_id`) REFERENCES `owners`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `owner_registrations_token_hash_unique` ON `owner_registrations` (`token_hash`);--> statement-breakpoint
CREATE INDEX `owner_registrations_pair_idx` ON `owner_registrations` (`pair_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `owner_registrations_owner_idx` ON `owner_registrations` (`owner_id`);