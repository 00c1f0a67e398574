CREATE TABLE `audit_log` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`at` integer NOT NULL,
	`actor_user_id` integer,
	`actor_email` text NOT NULL,
	`action` text NOT NULL,
	`target_type` text,
	`target_id` text,
	`detail` text,
	`ip` text,
	FOREIGN KEY (`actor_user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `audit_log_at_idx` ON `audit_log` (`at`);--> statement-breakpoint
CREATE TABLE `captured_mail` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`received_at` integer NOT NULL,
	`from_address` text NOT NULL,
	`to_addresses` text NOT NULL,
	`subject` text NOT NULL,
	`text_body` text,
	`html_body` text,
	`raw` text NOT NULL
);
--> statement-breakpoint
CREATE TABLE `console_sessions` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` integer NOT NULL,
	`refresh_hash` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch() * 1000) NOT NULL,
	`expires_at` integer NOT NULL,
	`refreshed_at` integer,
	`revoked_at` integer,
	`ip` text,
	`user_agent` text,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `console_sessions_user_idx` ON `console_sessions` (`user_id`);--> statement-breakpoint
CREATE TABLE `mail_log` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`at` integer NOT NULL,
	`kind` text NOT NULL,
	`to` text NOT NULL,
	`subject` text NOT NULL,
	`status` text NOT NULL,
	`message_id` text,
	`error` text
);
--> statement-breakpoint
CREATE INDEX `mail_log_at_idx` ON `mail_log` (`at`);--> statement-breakpoint
CREATE TABLE `payment_events` (
	`id` text PRIMARY KEY NOT NULL,
	`type` text NOT NULL,
	`received_at` integer NOT NULL
);
--> statement-breakpoint
CREATE TABLE `plans` (
	`name` text PRIMARY KEY NOT NULL,
	`display_name` text NOT NULL,
	`included_units` integer NOT NULL,
	`monthly_fee_minor` integer DEFAULT 0 NOT NULL,
	`price_per_1000_units_minor` integer NOT NULL,
	`currency` text DEFAULT 'eur' NOT NULL
);
--> statement-breakpoint
CREATE TABLE `quota_notices` (
	`account_id` integer NOT NULL,
	`month` text NOT NULL,
	`threshold` integer NOT NULL,
	`sent_at` integer NOT NULL,
	PRIMARY KEY(`account_id`, `month`, `threshold`),
	FOREIGN KEY (`account_id`) REFERENCES `accounts`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `statements` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`account_id` integer NOT NULL,
	`month` text NOT NULL,
	`plan_name` text NOT NULL,
	`units` integer NOT NULL,
	`included_units` integer NOT NULL,
	`overage_units` integer NOT NULL,
	`amount_minor` integer NOT NULL,
	`currency` text NOT NULL,
	`status` text DEFAULT 'draft' NOT NULL,
	`provider_invoice_id` text,
	`finalized_at` integer,
	`paid_at` integer,
	`created_at` integer DEFAULT (unixepoch() * 1000) NOT NULL,
	FOREIGN KEY (`account_id`) REFERENCES `accounts`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `statements_provider_invoice_id_unique` ON `statements` (`provider_invoice_id`);--> statement-breakpoint
CREATE UNIQUE INDEX `statements_account_month_idx` ON `statements` (`account_id`,`month`);--> statement-breakpoint
CREATE TABLE `user_tokens` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`purpose` text NOT NULL,
	`token_hash` text NOT NULL,
	`email` text NOT NULL,
	`user_id` integer,
	`role` text,
	`account_ids` text,
	`created_by_user_id` integer,
	`created_at` integer DEFAULT (unixepoch() * 1000) NOT NULL,
	`expires_at` integer NOT NULL,
	`used_at` integer,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by_user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `user_tokens_token_hash_unique` ON `user_tokens` (`token_hash`);--> statement-breakpoint
ALTER TABLE `accounts` ADD `payment_customer_id` text;--> statement-breakpoint
ALTER TABLE `users` ADD `name` text;--> statement-breakpoint
ALTER TABLE `users` ADD `failed_sign_ins` integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `users` ADD `locked_until` integer;