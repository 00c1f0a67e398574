ALTER TABLE `statements` ADD `monthly_fee_minor` integer;--> statement-breakpoint
ALTER TABLE `statements` ADD `price_per_1000_units_minor` integer;