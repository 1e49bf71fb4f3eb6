RENAME TABLE `regrade_requests` TO `recheck_requests`;--> statement-breakpoint
ALTER TABLE `recheck_requests` DROP FOREIGN KEY `regrade_requests_course_id_courses_id_fk`;
--> statement-breakpoint
ALTER TABLE `recheck_requests` DROP FOREIGN KEY `regrade_requests_submission_id_submissions_id_fk`;
--> statement-breakpoint
ALTER TABLE `recheck_requests` DROP FOREIGN KEY `regrade_requests_requested_by_users_id_fk`;
--> statement-breakpoint
ALTER TABLE `recheck_requests` DROP FOREIGN KEY `regrade_requests_answered_by_users_id_fk`;
--> statement-breakpoint
DROP INDEX `regrade_requests_course_status_idx` ON `recheck_requests`;--> statement-breakpoint
DROP INDEX `regrade_requests_submission_idx` ON `recheck_requests`;--> statement-breakpoint
ALTER TABLE `recheck_requests` ADD CONSTRAINT `recheck_requests_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `recheck_requests` ADD CONSTRAINT `recheck_requests_submission_id_submissions_id_fk` FOREIGN KEY (`submission_id`) REFERENCES `submissions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `recheck_requests` ADD CONSTRAINT `recheck_requests_requested_by_users_id_fk` FOREIGN KEY (`requested_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `recheck_requests` ADD CONSTRAINT `recheck_requests_answered_by_users_id_fk` FOREIGN KEY (`answered_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `recheck_requests_course_status_idx` ON `recheck_requests` (`course_id`,`status`);--> statement-breakpoint
CREATE INDEX `recheck_requests_submission_idx` ON `recheck_requests` (`submission_id`);