CREATE TABLE `analyses` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`drive_log_id` bigint unsigned NOT NULL,
	`version` int unsigned NOT NULL,
	`settings` json NOT NULL,
	`firing_order` double NOT NULL,
	`isolation_min_db` double,
	`isolation_max_db` double,
	`rpm_min` double,
	`rpm_max` double,
	`resonance_rpm` double,
	`resonance_db` double,
	`rattle_verdict` enum('ok','over-limit'),
	`idle_ang_accel_rad_s2` double,
	`warnings` json NOT NULL,
	`result_gz` mediumblob NOT NULL,
	`order_map_gz` mediumblob NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `analyses_id` PRIMARY KEY(`id`),
	CONSTRAINT `analyses_log_version_unique` UNIQUE(`drive_log_id`,`version`)
);
--> statement-breakpoint
CREATE TABLE `analysis_jobs` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`drive_log_id` bigint unsigned NOT NULL,
	`settings` json NOT NULL,
	`status` enum('queued','running','done','failed') NOT NULL DEFAULT 'queued',
	`attempts` int unsigned NOT NULL DEFAULT 0,
	`claimed_by` varchar(64),
	`heartbeat_at` datetime(3),
	`last_error` text,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`finished_at` datetime(3),
	CONSTRAINT `analysis_jobs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `analysis_segments` (
	`analysis_id` bigint unsigned NOT NULL,
	`seq` smallint unsigned NOT NULL,
	`kind` enum('start','idle','steady','run-up','coast-down') NOT NULL,
	`start_s` double NOT NULL,
	`end_s` double NOT NULL,
	`mean_rpm` double NOT NULL,
	CONSTRAINT `analysis_segments_analysis_id_seq_pk` PRIMARY KEY(`analysis_id`,`seq`)
);
--> statement-breakpoint
CREATE TABLE `drive_logs` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`vehicle_id` bigint unsigned NOT NULL,
	`file_name` varchar(255) NOT NULL,
	`blob_key` varchar(64) NOT NULL,
	`size_bytes` bigint unsigned NOT NULL,
	`condition` enum('idle-neutral','idle-in-gear','drive-away','run-up','coast-down','start-stop','steady','other') NOT NULL,
	`gear` tinyint,
	`damper_variant` varchar(80) NOT NULL,
	`test_date` date,
	`notes` text NOT NULL,
	`uploaded_by` bigint unsigned,
	`uploaded_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`status` enum('queued','analysing','done','failed') NOT NULL DEFAULT 'queued',
	`progress` double NOT NULL DEFAULT 0,
	`stage` varchar(20),
	`error` json,
	`latest_analysis_id` bigint unsigned,
	CONSTRAINT `drive_logs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `isolation_points` (
	`analysis_id` bigint unsigned NOT NULL,
	`rpm` double NOT NULL,
	`db` double NOT NULL,
	`blocks` int unsigned NOT NULL,
	`above_noise` boolean NOT NULL,
	CONSTRAINT `isolation_points_analysis_id_rpm_pk` PRIMARY KEY(`analysis_id`,`rpm`)
);
--> statement-breakpoint
CREATE TABLE `order_curve_points` (
	`analysis_id` bigint unsigned NOT NULL,
	`order_q` double NOT NULL,
	`rpm` double NOT NULL,
	`crank_rpm` double NOT NULL,
	`gearbox_rpm` double NOT NULL,
	`blocks` int unsigned NOT NULL,
	CONSTRAINT `order_curve_points_analysis_id_order_q_rpm_pk` PRIMARY KEY(`analysis_id`,`order_q`,`rpm`)
);
--> statement-breakpoint
CREATE TABLE `vehicles` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`team_id` bigint unsigned NOT NULL,
	`name` varchar(120) NOT NULL,
	`identifier` varchar(40) NOT NULL,
	`cylinders` tinyint unsigned NOT NULL,
	`stroke` tinyint unsigned NOT NULL,
	`fuel` enum('diesel','petrol','hybrid','other') NOT NULL,
	`idle_rpm` smallint unsigned NOT NULL,
	`firing_order_override` double,
	`transmission_type` enum('manual','dual-clutch','automatic','automated-manual','other') NOT NULL,
	`gear_ratios` json NOT NULL,
	`damper_type` enum('dual-mass-flywheel','dual-mass-flywheel-pendulum','clutch-disc-damper','clutch-disc-damper-pendulum') NOT NULL,
	`damper_variant` varchar(80) NOT NULL,
	`primary_inertia_kg_m2` double,
	`secondary_inertia_kg_m2` double,
	`spring_rate_nm_per_deg` double,
	`rattle_limit_rad_s2` double NOT NULL DEFAULT 500,
	`column_mapping` json,
	`notes` text NOT NULL,
	`archived_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `vehicles_id` PRIMARY KEY(`id`),
	CONSTRAINT `vehicles_team_identifier_unique` UNIQUE(`team_id`,`identifier`)
);
--> statement-breakpoint
ALTER TABLE `analyses` ADD CONSTRAINT `analyses_drive_log_id_drive_logs_id_fk` FOREIGN KEY (`drive_log_id`) REFERENCES `drive_logs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `analysis_jobs` ADD CONSTRAINT `analysis_jobs_drive_log_id_drive_logs_id_fk` FOREIGN KEY (`drive_log_id`) REFERENCES `drive_logs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `analysis_segments` ADD CONSTRAINT `analysis_segments_analysis_id_analyses_id_fk` FOREIGN KEY (`analysis_id`) REFERENCES `analyses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `drive_logs` ADD CONSTRAINT `drive_logs_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `drive_logs` ADD CONSTRAINT `drive_logs_vehicle_id_vehicles_id_fk` FOREIGN KEY (`vehicle_id`) REFERENCES `vehicles`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `drive_logs` ADD CONSTRAINT `drive_logs_uploaded_by_users_id_fk` FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `isolation_points` ADD CONSTRAINT `isolation_points_analysis_id_analyses_id_fk` FOREIGN KEY (`analysis_id`) REFERENCES `analyses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `order_curve_points` ADD CONSTRAINT `order_curve_points_analysis_id_analyses_id_fk` FOREIGN KEY (`analysis_id`) REFERENCES `analyses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `vehicles` ADD CONSTRAINT `vehicles_team_id_teams_id_fk` FOREIGN KEY (`team_id`) REFERENCES `teams`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `analysis_jobs_status_idx` ON `analysis_jobs` (`status`,`id`);--> statement-breakpoint
CREATE INDEX `drive_logs_vehicle_idx` ON `drive_logs` (`vehicle_id`,`uploaded_at`);--> statement-breakpoint
CREATE INDEX `drive_logs_blob_idx` ON `drive_logs` (`vehicle_id`,`blob_key`);--> statement-breakpoint
CREATE INDEX `drive_logs_team_idx` ON `drive_logs` (`team_id`);--> statement-breakpoint
CREATE INDEX `vehicles_team_idx` ON `vehicles` (`team_id`);