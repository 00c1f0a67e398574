CREATE TABLE `account_signing_secrets` (
	`account_id` integer PRIMARY KEY NOT NULL,
	`secret` text NOT NULL,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`account_id`) REFERENCES `accounts`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `job_chunks` (
	`job_id` text NOT NULL,
	`start` integer NOT NULL,
	`rows` text NOT NULL,
	PRIMARY KEY(`job_id`, `start`),
	FOREIGN KEY (`job_id`) REFERENCES `jobs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `jobs` (
	`id` text PRIMARY KEY NOT NULL,
	`account_id` integer NOT NULL,
	`key_id` integer,
	`operation` text NOT NULL,
	`state` text NOT NULL,
	`input` text NOT NULL,
	`total` integer NOT NULL,
	`done` integer DEFAULT 0 NOT NULL,
	`units` integer DEFAULT 0 NOT NULL,
	`claim` text,
	`lease_until` integer,
	`problem` text,
	`callback_url` text,
	`callback_state` text,
	`callback_attempts` integer DEFAULT 0 NOT NULL,
	`callback_outcome` text,
	`created_at` integer NOT NULL,
	`started_at` integer,
	`finished_at` integer,
	`expires_at` integer,
	FOREIGN KEY (`account_id`) REFERENCES `accounts`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`key_id`) REFERENCES `api_keys`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `jobs_state_idx` ON `jobs` (`state`,`created_at`);--> statement-breakpoint
CREATE INDEX `jobs_account_idx` ON `jobs` (`account_id`);--> statement-breakpoint
CREATE INDEX `jobs_expires_idx` ON `jobs` (`expires_at`);