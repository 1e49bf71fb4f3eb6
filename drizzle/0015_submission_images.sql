CREATE TABLE `submission_images` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`submission_id` bigint unsigned NOT NULL,
	`course_id` bigint unsigned NOT NULL,
	`image_key` varchar(60) NOT NULL,
	`content_type` varchar(20) NOT NULL,
	`width` int NOT NULL,
	`height` int NOT NULL,
	`size` int NOT NULL,
	`sha256` char(64) NOT NULL,
	`original_sha256` char(64) NOT NULL,
	`original_size` int NOT NULL,
	`bytes` longblob NOT NULL,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `submission_images_id` PRIMARY KEY(`id`),
	CONSTRAINT `submission_images_submission_key_uq` UNIQUE(`submission_id`,`image_key`)
);
--> statement-breakpoint
ALTER TABLE `submission_images` ADD CONSTRAINT `submission_images_submission_id_submissions_id_fk` FOREIGN KEY (`submission_id`) REFERENCES `submissions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `submission_images` ADD CONSTRAINT `submission_images_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `submission_images_course_original_idx` ON `submission_images` (`course_id`,`original_sha256`);