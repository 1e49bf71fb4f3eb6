CREATE TABLE `grade_changes` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`submission_id` bigint unsigned NOT NULL,
	`check_id` bigint unsigned,
	`target` varchar(200) NOT NULL,
	`changed_by` bigint unsigned NOT NULL,
	`old_points` double,
	`new_points` double NOT NULL,
	`reason` varchar(2000) NOT NULL,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `grade_changes_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `submission_comments` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`submission_id` bigint unsigned NOT NULL,
	`author_id` bigint unsigned NOT NULL,
	`body` text NOT NULL,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `submission_comments_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `submissions` ADD `score_override` double;--> statement-breakpoint
ALTER TABLE `submission_checks` ADD `overridden` boolean DEFAULT false NOT NULL;--> statement-breakpoint
ALTER TABLE `grade_changes` ADD CONSTRAINT `grade_changes_submission_id_submissions_id_fk` FOREIGN KEY (`submission_id`) REFERENCES `submissions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `grade_changes` ADD CONSTRAINT `grade_changes_check_id_submission_checks_id_fk` FOREIGN KEY (`check_id`) REFERENCES `submission_checks`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `grade_changes` ADD CONSTRAINT `grade_changes_changed_by_users_id_fk` FOREIGN KEY (`changed_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `submission_comments` ADD CONSTRAINT `submission_comments_submission_id_submissions_id_fk` FOREIGN KEY (`submission_id`) REFERENCES `submissions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `submission_comments` ADD CONSTRAINT `submission_comments_author_id_users_id_fk` FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `grade_changes_submission_idx` ON `grade_changes` (`submission_id`);--> statement-breakpoint
CREATE INDEX `submission_comments_submission_idx` ON `submission_comments` (`submission_id`);