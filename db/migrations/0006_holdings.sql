CREATE TABLE `holdings` (
	`item_id` text NOT NULL,
	`holder_id` text NOT NULL,
	`holder_kind` text NOT NULL,
	`holder_identity` text NOT NULL,
	`paths` integer NOT NULL,
	PRIMARY KEY(`item_id`, `holder_id`),
	CONSTRAINT "holdings_paths_not_negative" CHECK("holdings"."paths" >= 0)
) WITHOUT ROWID;
--> statement-breakpoint
CREATE INDEX `holdings_holder_idx` ON `holdings` (`holder_id`);--> statement-breakpoint
CREATE INDEX `holdings_spent_idx` ON `holdings` (`item_id`) WHERE "holdings"."paths" = 0;