CREATE TABLE `invitations` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`course_id` bigint unsigned,
	`token_hash` char(64) NOT NULL,
	`expires_at` timestamp(3) NOT NULL,
	`used_at` timestamp(3),
	`created_by` bigint unsigned,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `invitations_id` PRIMARY KEY(`id`),
	CONSTRAINT `invitations_token_hash_uq` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `due_extensions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`module_id` bigint unsigned NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`due_at` timestamp(3) NOT NULL,
	`note` varchar(500) NOT NULL DEFAULT '',
	`granted_by` bigint unsigned,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `due_extensions_id` PRIMARY KEY(`id`),
	CONSTRAINT `due_extensions_module_user_uq` UNIQUE(`module_id`,`user_id`)
);
--> statement-breakpoint
CREATE TABLE `regrade_requests` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`course_id` bigint unsigned NOT NULL,
	`submission_id` bigint unsigned NOT NULL,
	`requested_by` bigint unsigned NOT NULL,
	`message` text NOT NULL,
	`status` enum('open','answered') NOT NULL DEFAULT 'open',
	`answer` text,
	`answered_by` bigint unsigned,
	`answered_at` timestamp(3),
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `regrade_requests_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `modules` ADD `weight` double DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE `invitations` ADD CONSTRAINT `invitations_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `invitations` ADD CONSTRAINT `invitations_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `invitations` ADD CONSTRAINT `invitations_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `due_extensions` ADD CONSTRAINT `due_extensions_module_id_modules_id_fk` FOREIGN KEY (`module_id`) REFERENCES `modules`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `due_extensions` ADD CONSTRAINT `due_extensions_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `due_extensions` ADD CONSTRAINT `due_extensions_granted_by_users_id_fk` FOREIGN KEY (`granted_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `regrade_requests` ADD CONSTRAINT `regrade_requests_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `regrade_requests` ADD CONSTRAINT `regrade_requests_submission_id_submissions_id_fk` FOREIGN KEY (`submission_id`) REFERENCES `submissions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `regrade_requests` ADD CONSTRAINT `regrade_requests_requested_by_users_id_fk` FOREIGN KEY (`requested_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `regrade_requests` ADD CONSTRAINT `regrade_requests_answered_by_users_id_fk` FOREIGN KEY (`answered_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `invitations_user_idx` ON `invitations` (`user_id`);--> statement-breakpoint
CREATE INDEX `due_extensions_user_idx` ON `due_extensions` (`user_id`);--> statement-breakpoint
CREATE INDEX `regrade_requests_course_status_idx` ON `regrade_requests` (`course_id`,`status`);--> statement-breakpoint
CREATE INDEX `regrade_requests_submission_idx` ON `regrade_requests` (`submission_id`);