ALTER TABLE `links` ADD `parent_kind` text;--> statement-breakpoint
ALTER TABLE `links` ADD `parent_identity` text;--> statement-breakpoint
CREATE INDEX `links_open_holders` ON `links` (`child_id`,`parent_id`,`parent_kind`,`parent_identity`) WHERE "links"."ended_at" IS NULL;