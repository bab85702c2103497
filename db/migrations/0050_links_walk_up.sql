CREATE INDEX `links_up` ON `links` (`child_id`,`parent_id`,`parent_kind`,`started_at`);--> statement-breakpoint
CREATE INDEX `links_ended` ON `links` (`child_id`) WHERE "links"."ended_at" IS NOT NULL;