PRAGMA foreign_keys=OFF;--> statement-breakpoint
CREATE TABLE `__new_request_log` (
	`id` integer PRIMARY KEY NOT NULL,
	`request_id` text NOT NULL,
	`at` integer NOT NULL,
	`account_id` integer,
	`key_id` integer,
	`method` text NOT NULL,
	`path` text NOT NULL,
	`status` integer NOT NULL,
	`latency_ms` integer NOT NULL,
	`request_body` text,
	`response_body` text,
	`engine_version` text NOT NULL,
	FOREIGN KEY (`account_id`) REFERENCES `accounts`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`key_id`) REFERENCES `api_keys`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
INSERT INTO `__new_request_log`("id", "request_id", "at", "account_id", "key_id", "method", "path", "status", "latency_ms", "request_body", "response_body", "engine_version") SELECT "id", "request_id", "at", "account_id", "key_id", "method", "path", "status", "latency_ms", "request_body", "response_body", "engine_version" FROM `request_log`;--> statement-breakpoint
DROP TABLE `request_log`;--> statement-breakpoint
ALTER TABLE `__new_request_log` RENAME TO `request_log`;--> statement-breakpoint
PRAGMA foreign_keys=ON;--> statement-breakpoint
CREATE INDEX `request_log_at_idx` ON `request_log` (`at`);--> statement-breakpoint
CREATE INDEX `request_log_account_at_idx` ON `request_log` (`account_id`,`at`);--> statement-breakpoint
CREATE TABLE `__new_usage_events` (
	`id` integer PRIMARY KEY NOT NULL,
	`at` integer NOT NULL,
	`account_id` integer NOT NULL,
	`key_id` integer,
	`operation` text NOT NULL,
	`status` integer NOT NULL,
	`units` integer NOT NULL,
	`latency_ms` integer NOT NULL,
	`request_id` text NOT NULL,
	`engine_version` text NOT NULL,
	FOREIGN KEY (`account_id`) REFERENCES `accounts`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`key_id`) REFERENCES `api_keys`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
INSERT INTO `__new_usage_events`("id", "at", "account_id", "key_id", "operation", "status", "units", "latency_ms", "request_id", "engine_version") SELECT "id", "at", "account_id", "key_id", "operation", "status", "units", "latency_ms", "request_id", "engine_version" FROM `usage_events`;--> statement-breakpoint
DROP TABLE `usage_events`;--> statement-breakpoint
ALTER TABLE `__new_usage_events` RENAME TO `usage_events`;--> statement-breakpoint
CREATE INDEX `usage_events_account_at_idx` ON `usage_events` (`account_id`,`at`);