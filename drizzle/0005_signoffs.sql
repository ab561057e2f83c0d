CREATE TABLE `signoff_results` (
	`signoff_id` bigint unsigned NOT NULL,
	`drive_log_id` bigint unsigned NOT NULL,
	`analysis_id` bigint unsigned NOT NULL,
	`blob_key` varchar(64) NOT NULL,
	`result_gz` mediumblob NOT NULL,
	CONSTRAINT `signoff_results_signoff_id_drive_log_id_pk` PRIMARY KEY(`signoff_id`,`drive_log_id`)
);
--> statement-breakpoint
CREATE TABLE `signoff_steps` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`signoff_id` bigint unsigned NOT NULL,
	`step` enum('proposed','approved','rejected','superseded','withdrawn') NOT NULL,
	`actor_user_id` bigint unsigned,
	`actor_name` varchar(120) NOT NULL,
	`actor_email` varchar(254) NOT NULL,
	`text` text NOT NULL,
	`at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `signoff_steps_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `signoffs` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`vehicle_id` bigint unsigned NOT NULL,
	`damper_variant` varchar(80) NOT NULL,
	`state` enum('proposed','approved','rejected','superseded','withdrawn') NOT NULL DEFAULT 'proposed',
	`claims` json NOT NULL,
	`deviations` json NOT NULL,
	`note` text NOT NULL,
	`record` mediumblob NOT NULL,
	`proposed_by` bigint unsigned,
	`proposed_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`decided_by` bigint unsigned,
	`decided_at` datetime(3),
	`decision_comment` text,
	`digest` varchar(64),
	`report_sha256` varchar(64),
	`closed_at` datetime(3),
	`closed_reason` varchar(1000),
	`closed_by` bigint unsigned,
	CONSTRAINT `signoffs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `shares` MODIFY COLUMN `kind` enum('log','comparison','signoff') NOT NULL;--> statement-breakpoint
ALTER TABLE `teams` ADD `signoff_approvers` enum('engineers','admins') DEFAULT 'engineers' NOT NULL;--> statement-breakpoint
ALTER TABLE `shares` ADD `signoff_id` bigint unsigned;--> statement-breakpoint
ALTER TABLE `signoff_results` ADD CONSTRAINT `signoff_results_signoff_id_signoffs_id_fk` FOREIGN KEY (`signoff_id`) REFERENCES `signoffs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoff_steps` ADD CONSTRAINT `signoff_steps_signoff_id_signoffs_id_fk` FOREIGN KEY (`signoff_id`) REFERENCES `signoffs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoff_steps` ADD CONSTRAINT `signoff_steps_actor_user_id_users_id_fk` FOREIGN KEY (`actor_user_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_vehicle_id_vehicles_id_fk` FOREIGN KEY (`vehicle_id`) REFERENCES `vehicles`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_proposed_by_users_id_fk` FOREIGN KEY (`proposed_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_decided_by_users_id_fk` FOREIGN KEY (`decided_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_closed_by_users_id_fk` FOREIGN KEY (`closed_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `signoff_results_blob_idx` ON `signoff_results` (`blob_key`);--> statement-breakpoint
CREATE INDEX `signoff_steps_signoff_idx` ON `signoff_steps` (`signoff_id`,`id`);--> statement-breakpoint
CREATE INDEX `signoffs_vehicle_idx` ON `signoffs` (`vehicle_id`,`damper_variant`,`proposed_at`);--> statement-breakpoint
CREATE INDEX `signoffs_team_idx` ON `signoffs` (`team_id`,`state`);