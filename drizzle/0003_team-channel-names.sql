ALTER TABLE `teams` ADD `channel_names` json;--> statement-breakpoint
ALTER TABLE `teams` ADD `strict_ingest` boolean DEFAULT false NOT NULL;