ALTER TABLE `events` ADD `prev_hash` text;--> statement-breakpoint
ALTER TABLE `events` ADD `hash` text;