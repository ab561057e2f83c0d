CREATE TABLE `comments` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`vehicle_id` bigint unsigned NOT NULL,
	`subject_key` varchar(200) NOT NULL,
	`author_id` bigint unsigned,
	`body` text NOT NULL,
	`pin_time_s` double,
	`pin_rpm` double,
	`edited` tinyint NOT NULL DEFAULT 0,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`deleted_at` datetime(3),
	CONSTRAINT `comments_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `share_views` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`share_id` bigint unsigned NOT NULL,
	`viewed_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `share_views_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `shares` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`vehicle_id` bigint unsigned NOT NULL,
	`kind` enum('log','comparison') NOT NULL,
	`drive_log_id` bigint unsigned,
	`log_ids` json NOT NULL,
	`token_hash` varchar(64) NOT NULL,
	`note` text NOT NULL,
	`allow_raw_download` boolean NOT NULL DEFAULT false,
	`created_by` bigint unsigned,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`expires_at` datetime(3) NOT NULL,
	`revoked_at` datetime(3),
	`view_count` int unsigned NOT NULL DEFAULT 0,
	`last_viewed_at` datetime(3),
	CONSTRAINT `shares_id` PRIMARY KEY(`id`),
	CONSTRAINT `shares_token_unique` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `targets` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`vehicle_id` bigint unsigned NOT NULL,
	`kind` enum('isolation','rattle') NOT NULL,
	`name` varchar(120) NOT NULL,
	`rpm_from` double,
	`rpm_to` double,
	`min_db` double,
	`max_rad_s2` double,
	`conditions` json NOT NULL,
	`gears` json NOT NULL,
	`created_by` bigint unsigned,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `targets_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `comments` ADD CONSTRAINT `comments_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `comments` ADD CONSTRAINT `comments_vehicle_id_vehicles_id_fk` FOREIGN KEY (`vehicle_id`) REFERENCES `vehicles`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `comments` ADD CONSTRAINT `comments_author_id_users_id_fk` FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `share_views` ADD CONSTRAINT `share_views_share_id_shares_id_fk` FOREIGN KEY (`share_id`) REFERENCES `shares`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `shares` ADD CONSTRAINT `shares_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `shares` ADD CONSTRAINT `shares_vehicle_id_vehicles_id_fk` FOREIGN KEY (`vehicle_id`) REFERENCES `vehicles`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `shares` ADD CONSTRAINT `shares_drive_log_id_drive_logs_id_fk` FOREIGN KEY (`drive_log_id`) REFERENCES `drive_logs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `shares` ADD CONSTRAINT `shares_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `targets` ADD CONSTRAINT `targets_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `targets` ADD CONSTRAINT `targets_vehicle_id_vehicles_id_fk` FOREIGN KEY (`vehicle_id`) REFERENCES `vehicles`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `targets` ADD CONSTRAINT `targets_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `comments_subject_idx` ON `comments` (`team_id`,`subject_key`,`created_at`);--> statement-breakpoint
CREATE INDEX `share_views_share_idx` ON `share_views` (`share_id`,`viewed_at`);--> statement-breakpoint
CREATE INDEX `shares_team_idx` ON `shares` (`team_id`,`created_at`);--> statement-breakpoint
CREATE INDEX `targets_vehicle_idx` ON `targets` (`vehicle_id`);