ALTER TABLE `submission_flags` ADD `digested_at` timestamp(3);--> statement-breakpoint
CREATE INDEX `submission_flags_digested_idx` ON `submission_flags` (`digested_at`);