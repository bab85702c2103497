CREATE TABLE `limit_hits` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`attempt` text NOT NULL,
	`key` text NOT NULL,
	`state` text NOT NULL,
	`at` integer NOT NULL,
	CONSTRAINT "limit_hits_state_check" CHECK("limit_hits"."state" IN ('pending', 'counted', 'success'))
);
--> statement-breakpoint
CREATE INDEX `limit_hits_key_idx` ON `limit_hits` (`key`,`at`);--> statement-breakpoint
CREATE INDEX `limit_hits_attempt_idx` ON `limit_hits` (`attempt`);--> statement-breakpoint
CREATE INDEX `limit_hits_at_idx` ON `limit_hits` (`at`);--> statement-breakpoint
DROP TABLE `sign_in_attempts`;