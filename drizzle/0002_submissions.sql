CREATE TABLE `submissions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`course_id` bigint unsigned NOT NULL,
	`module_id` bigint unsigned NOT NULL,
	`module_version_id` bigint unsigned NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`lab_group_id` bigint unsigned,
	`attempt` int NOT NULL,
	`status` enum('received','graded','grading-failed') NOT NULL DEFAULT 'received',
	`grading_error` varchar(1000),
	`inputs` json NOT NULL,
	`is_late` boolean NOT NULL DEFAULT false,
	`days_late` int NOT NULL DEFAULT 0,
	`late_penalty` double NOT NULL DEFAULT 0,
	`raw_score` double,
	`score` double,
	`max_score` double,
	`review_status` enum('none','open','in-review','resolved') NOT NULL DEFAULT 'none',
	`revision` int NOT NULL DEFAULT 0,
	`submitted_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`graded_at` timestamp(3),
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `submissions_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `submission_files` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`submission_id` bigint unsigned NOT NULL,
	`course_id` bigint unsigned NOT NULL,
	`table_key` varchar(60) NOT NULL,
	`filename` varchar(255) NOT NULL,
	`content_type` varchar(120) NOT NULL,
	`size` int NOT NULL,
	`sha256` char(64) NOT NULL,
	`bytes` longblob NOT NULL,
	`mapping` json NOT NULL,
	`parsed` json NOT NULL,
	`row_count` int NOT NULL,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `submission_files_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `submission_checks` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`submission_id` bigint unsigned NOT NULL,
	`result_key` varchar(60) NOT NULL,
	`label` varchar(200) NOT NULL,
	`unit` varchar(20) NOT NULL,
	`reported` double,
	`expected` double,
	`abs_error` double,
	`rel_error` double,
	`tolerance` double,
	`points_possible` double NOT NULL,
	`points_awarded` double NOT NULL,
	`pass` boolean NOT NULL,
	`outcome` enum('pass','partial','fail','error') NOT NULL,
	`error` varchar(1000),
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `submission_checks_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `submission_flags` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`submission_id` bigint unsigned NOT NULL,
	`code` varchar(80) NOT NULL,
	`message` varchar(1000) NOT NULL,
	`detail` json,
	`status` enum('open','resolved') NOT NULL DEFAULT 'open',
	`resolved_by` bigint unsigned,
	`resolved_at` timestamp(3),
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `submission_flags_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `modules` ADD `grades_released_at` timestamp(3);--> statement-breakpoint
ALTER TABLE `submissions` ADD CONSTRAINT `submissions_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `submissions` ADD CONSTRAINT `submissions_module_id_modules_id_fk` FOREIGN KEY (`module_id`) REFERENCES `modules`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `submissions` ADD CONSTRAINT `submissions_module_version_id_module_versions_id_fk` FOREIGN KEY (`module_version_id`) REFERENCES `module_versions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `submissions` ADD CONSTRAINT `submissions_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `submissions` ADD CONSTRAINT `submissions_lab_group_id_lab_groups_id_fk` FOREIGN KEY (`lab_group_id`) REFERENCES `lab_groups`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `submission_files` ADD CONSTRAINT `submission_files_submission_id_submissions_id_fk` FOREIGN KEY (`submission_id`) REFERENCES `submissions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `submission_files` ADD CONSTRAINT `submission_files_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `submission_checks` ADD CONSTRAINT `submission_checks_submission_id_submissions_id_fk` FOREIGN KEY (`submission_id`) REFERENCES `submissions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `submission_flags` ADD CONSTRAINT `submission_flags_submission_id_submissions_id_fk` FOREIGN KEY (`submission_id`) REFERENCES `submissions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `submission_flags` ADD CONSTRAINT `submission_flags_resolved_by_users_id_fk` FOREIGN KEY (`resolved_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `submissions_module_user_idx` ON `submissions` (`module_id`,`user_id`);--> statement-breakpoint
CREATE INDEX `submissions_module_group_idx` ON `submissions` (`module_id`,`lab_group_id`);--> statement-breakpoint
CREATE INDEX `submissions_course_review_idx` ON `submissions` (`course_id`,`review_status`);--> statement-breakpoint
CREATE INDEX `submission_files_course_sha_idx` ON `submission_files` (`course_id`,`sha256`);--> statement-breakpoint
CREATE INDEX `submission_files_submission_idx` ON `submission_files` (`submission_id`);--> statement-breakpoint
CREATE INDEX `submission_checks_submission_idx` ON `submission_checks` (`submission_id`);--> statement-breakpoint
CREATE INDEX `submission_flags_submission_idx` ON `submission_flags` (`submission_id`);