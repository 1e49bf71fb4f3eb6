ALTER TABLE `submissions` MODIFY COLUMN `status` enum('received','grading','graded','grading-failed') NOT NULL DEFAULT 'received';--> statement-breakpoint
ALTER TABLE `submissions` ADD `grade_attempts` int DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `submissions` ADD `grade_after` timestamp(3);--> statement-breakpoint
ALTER TABLE `submissions` ADD `grade_claimed_at` timestamp(3);--> statement-breakpoint
ALTER TABLE `submission_checks` ADD CONSTRAINT `submission_checks_submission_result_uq` UNIQUE(`submission_id`,`result_key`);--> statement-breakpoint
CREATE INDEX `submissions_grading_idx` ON `submissions` (`status`,`grade_after`);