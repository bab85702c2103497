CREATE TABLE `payment_requests` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`case_id` text NOT NULL,
	`quote_id` text NOT NULL,
	`session_id` text NOT NULL,
	`amount_minor` integer NOT NULL,
	`currency` text NOT NULL,
	`event_id` integer NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`case_id`) REFERENCES `service_cases`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`quote_id`) REFERENCES `quotes`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `payment_requests_session_id_unique` ON `payment_requests` (`session_id`);--> statement-breakpoint
CREATE INDEX `payment_requests_case_idx` ON `payment_requests` (`case_id`,`created_at`);--> statement-breakpoint
CREATE TABLE `payments` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`case_id` text NOT NULL,
	`quote_id` text NOT NULL,
	`session_id` text NOT NULL,
	`payment_intent_id` text NOT NULL,
	`provider_event_id` text NOT NULL,
	`amount_minor` integer NOT NULL,
	`currency` text NOT NULL,
	`event_id` integer NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`case_id`) REFERENCES `service_cases`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`quote_id`) REFERENCES `quotes`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "payments_amount" CHECK("payments"."amount_minor" > 0)
);
--> statement-breakpoint
CREATE UNIQUE INDEX `payments_session_unique` ON `payments` (`session_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `payments_provider_event_unique` ON `payments` (`provider_event_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `payments_intent_unique` ON `payments` (`payment_intent_id`);--> statement-breakpoint
CREATE INDEX `payments_case_idx` ON `payments` (`case_id`);--> statement-breakpoint
CREATE TABLE `quotes` (
	`id` text PRIMARY KEY NOT NULL,
	`case_id` text NOT NULL,
	`currency` text NOT NULL,
	`lines` text NOT NULL,
	`total_minor` integer NOT NULL,
	`event_id` integer NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`case_id`) REFERENCES `service_cases`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action,
	CONSTRAINT "quotes_currency" CHECK("quotes"."currency" GLOB '[A-Z][A-Z][A-Z]'),
	CONSTRAINT "quotes_total" CHECK("quotes"."total_minor" > 0)
);
--> statement-breakpoint
CREATE INDEX `quotes_case_idx` ON `quotes` (`case_id`,`created_at`);--> statement-breakpoint
CREATE TABLE `refunds` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`payment_id` integer NOT NULL,
	`case_id` text NOT NULL,
	`refund_id` text NOT NULL,
	`amount_minor` integer NOT NULL,
	`currency` text NOT NULL,
	`reason` text NOT NULL,
	`event_id` integer NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`payment_id`) REFERENCES `payments`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`case_id`) REFERENCES `service_cases`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`event_id`) REFERENCES `events`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `refunds_payment_unique` ON `refunds` (`payment_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `refunds_refund_unique` ON `refunds` (`refund_id`);