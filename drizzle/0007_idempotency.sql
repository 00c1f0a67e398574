CREATE TABLE `idempotency_records` (
	`account_id` integer NOT NULL,
	`key` text NOT NULL,
	`fingerprint` text NOT NULL,
	`claim` text NOT NULL,
	`created_at` integer NOT NULL,
	`lease_until` integer NOT NULL,
	`status` integer,
	`content_type` text,
	`body` text,
	PRIMARY KEY(`account_id`, `key`),
	FOREIGN KEY (`account_id`) REFERENCES `accounts`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `idempotency_records_created_idx` ON `idempotency_records` (`created_at`);--> statement-breakpoint
ALTER TABLE `request_log` ADD `idempotent_replay` integer DEFAULT false NOT NULL;