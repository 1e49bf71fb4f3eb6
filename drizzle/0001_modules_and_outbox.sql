CREATE TABLE `modules` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`course_id` bigint unsigned NOT NULL,
	`slug` varchar(80) NOT NULL,
	`status` enum('draft','published','closed') NOT NULL DEFAULT 'draft',
	`position` int NOT NULL DEFAULT 0,
	`current_version_id` bigint unsigned,
	`published_version_id` bigint unsigned,
	`created_by` bigint unsigned,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `modules_id` PRIMARY KEY(`id`),
	CONSTRAINT `modules_course_slug_uq` UNIQUE(`course_id`,`slug`)
);
--> statement-breakpoint
CREATE TABLE `module_versions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`module_id` bigint unsigned NOT NULL,
	`number` int NOT NULL,
	`status` enum('draft','published','superseded') NOT NULL DEFAULT 'draft',
	`source` mediumtext NOT NULL,
	`html` mediumtext NOT NULL,
	`front_matter` json,
	`title` varchar(200) NOT NULL,
	`due_at` timestamp(3),
	`issues` json NOT NULL DEFAULT ('[]'),
	`valid` boolean NOT NULL DEFAULT false,
	`created_by` bigint unsigned,
	`updated_by` bigint unsigned,
	`published_at` timestamp(3),
	`published_by` bigint unsigned,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `module_versions_id` PRIMARY KEY(`id`),
	CONSTRAINT `module_versions_module_number_uq` UNIQUE(`module_id`,`number`)
);
--> statement-breakpoint
CREATE TABLE `mail_outbox` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`dedupe_key` varchar(120) NOT NULL,
	`to_address` varchar(254) NOT NULL,
	`to_name` varchar(120) NOT NULL DEFAULT '',
	`subject` varchar(250) NOT NULL,
	`text_body` text NOT NULL,
	`html_body` text NOT NULL,
	`status` enum('pending','sending','sent','failed') NOT NULL DEFAULT 'pending',
	`attempts` int NOT NULL DEFAULT 0,
	`last_error` varchar(1000),
	`next_attempt_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`claimed_at` timestamp(3),
	`sent_at` timestamp(3),
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `mail_outbox_id` PRIMARY KEY(`id`),
	CONSTRAINT `mail_outbox_dedupe_to_uq` UNIQUE(`dedupe_key`,`to_address`)
);
--> statement-breakpoint
ALTER TABLE `modules` ADD CONSTRAINT `modules_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `modules` ADD CONSTRAINT `modules_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `module_versions` ADD CONSTRAINT `module_versions_module_id_modules_id_fk` FOREIGN KEY (`module_id`) REFERENCES `modules`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `module_versions` ADD CONSTRAINT `module_versions_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `module_versions` ADD CONSTRAINT `module_versions_updated_by_users_id_fk` FOREIGN KEY (`updated_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `module_versions` ADD CONSTRAINT `module_versions_published_by_users_id_fk` FOREIGN KEY (`published_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `modules_course_status_idx` ON `modules` (`course_id`,`status`);--> statement-breakpoint
CREATE INDEX `module_versions_module_idx` ON `module_versions` (`module_id`);--> statement-breakpoint
CREATE INDEX `mail_outbox_status_next_idx` ON `mail_outbox` (`status`,`next_attempt_at`);