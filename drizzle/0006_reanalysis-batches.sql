ALTER TABLE `analysis_jobs` ADD `batch_id` varchar(32);--> statement-breakpoint
CREATE INDEX `analysis_jobs_batch_idx` ON `analysis_jobs` (`batch_id`);