CREATE TABLE `mail_claims` (
	`outbox_id` integer PRIMARY KEY NOT NULL,
	`holder` text NOT NULL,
	`until` integer NOT NULL,
	FOREIGN KEY (`outbox_id`) REFERENCES `outbox`(`id`) ON UPDATE no action ON DELETE no action
);
