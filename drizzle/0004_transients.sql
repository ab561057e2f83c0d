ALTER TABLE `targets` MODIFY COLUMN `kind` enum('isolation','rattle','start-stop','twist-margin') NOT NULL;--> statement-breakpoint
ALTER TABLE `teams` ADD `trend_reference_rpm` smallint unsigned DEFAULT 1500 NOT NULL;--> statement-breakpoint
ALTER TABLE `analyses` ADD `model_natural_hz` double;--> statement-breakpoint
ALTER TABLE `analyses` ADD `model_damping_ratio` double;--> statement-breakpoint
ALTER TABLE `analyses` ADD `event_peak_db` double;--> statement-breakpoint
ALTER TABLE `analyses` ADD `event_twist_pp_deg` double;--> statement-breakpoint
ALTER TABLE `vehicles` ADD `damper_travel_limit_deg` double;--> statement-breakpoint
ALTER TABLE `targets` ADD `max_db` double;--> statement-breakpoint
ALTER TABLE `targets` ADD `min_margin_deg` double;