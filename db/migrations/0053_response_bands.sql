CREATE TABLE `response_bands` (
	`response_id` integer PRIMARY KEY NOT NULL,
	`min_hz` real NOT NULL,
	`max_hz` real NOT NULL,
	`levels` text NOT NULL,
	FOREIGN KEY (`response_id`) REFERENCES `responses`(`id`) ON UPDATE no action ON DELETE no action
);
