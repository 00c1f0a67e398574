DROP INDEX `stored_liquors_account_slug_idx`;--> statement-breakpoint
ALTER TABLE `stored_liquors` ADD `version` integer DEFAULT 1 NOT NULL;--> statement-breakpoint
CREATE UNIQUE INDEX `stored_liquors_account_slug_version_idx` ON `stored_liquors` (`account_id`,`liquor_id`,`version`);