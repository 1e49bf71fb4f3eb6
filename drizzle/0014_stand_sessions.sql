CREATE TABLE `stand_modules` (
	`stand_id` bigint unsigned NOT NULL,
	`module_id` bigint unsigned NOT NULL,
	CONSTRAINT `stand_modules_stand_id_module_id_pk` PRIMARY KEY(`stand_id`,`module_id`)
);
--> statement-breakpoint
CREATE TABLE `stand_slots` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`stand_id` bigint unsigned NOT NULL,
	`section_id` bigint unsigned NOT NULL,
	`starts_at` timestamp(3) NOT NULL,
	`minutes` int NOT NULL,
	`cancelled_at` timestamp(3),
	`cancel_reason` varchar(500),
	`created_by` bigint unsigned,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `stand_slots_id` PRIMARY KEY(`id`),
	CONSTRAINT `stand_slots_stand_start_uq` UNIQUE(`stand_id`,`starts_at`)
);
--> statement-breakpoint
CREATE TABLE `stands` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`course_id` bigint unsigned NOT NULL,
	`name` varchar(80) NOT NULL,
	`location` varchar(120) NOT NULL DEFAULT '',
	`max_pressure_note` varchar(120) NOT NULL DEFAULT '',
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `stands_id` PRIMARY KEY(`id`),
	CONSTRAINT `stands_course_name_uq` UNIQUE(`course_id`,`name`)
);
--> statement-breakpoint
CREATE TABLE `booking_waitlist` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`slot_id` bigint unsigned NOT NULL,
	`lab_group_id` bigint unsigned NOT NULL,
	`module_id` bigint unsigned NOT NULL,
	`added_by` bigint unsigned,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `booking_waitlist_id` PRIMARY KEY(`id`),
	CONSTRAINT `booking_waitlist_slot_group_uq` UNIQUE(`slot_id`,`lab_group_id`)
);
--> statement-breakpoint
CREATE TABLE `bookings` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`slot_id` bigint unsigned NOT NULL,
	`lab_group_id` bigint unsigned NOT NULL,
	`module_id` bigint unsigned NOT NULL,
	`status` enum('active','cancelled','moved') NOT NULL DEFAULT 'active',
	`active_slot_id` bigint unsigned GENERATED ALWAYS AS (CASE WHEN status = 'active' THEN slot_id END) STORED,
	`booked_by` bigint unsigned,
	`ended_by` bigint unsigned,
	`ended_at` timestamp(3),
	`reason` varchar(500),
	`moved_to_id` bigint unsigned,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `bookings_id` PRIMARY KEY(`id`),
	CONSTRAINT `bookings_active_slot_uq` UNIQUE(`active_slot_id`)
);
--> statement-breakpoint
CREATE TABLE `run_entries` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`run_id` bigint unsigned NOT NULL,
	`kind` enum('tick','untick','sign-off','correction','note') NOT NULL,
	`item_key` varchar(60),
	`text` varchar(2000),
	`by_user_id` bigint unsigned NOT NULL,
	`at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `run_entries_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `run_people` (
	`run_id` bigint unsigned NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	CONSTRAINT `run_people_run_id_user_id_pk` PRIMARY KEY(`run_id`,`user_id`)
);
--> statement-breakpoint
CREATE TABLE `run_records` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`course_id` bigint unsigned NOT NULL,
	`booking_id` bigint unsigned NOT NULL,
	`module_version_id` bigint unsigned NOT NULL,
	`checklist` json NOT NULL,
	`opened_by` bigint unsigned,
	`opened_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`started_at` timestamp(3),
	`ended_at` timestamp(3),
	`outcome` enum('completed','aborted','hang-fire','misfire'),
	`outcome_reason` varchar(500),
	`wait_minutes` int,
	`notes` text,
	`signed_off_by` bigint unsigned,
	`signed_off_at` timestamp(3),
	CONSTRAINT `run_records_id` PRIMARY KEY(`id`),
	CONSTRAINT `run_records_booking_uq` UNIQUE(`booking_id`)
);
--> statement-breakpoint
ALTER TABLE `courses` ADD `booking_cutoff_hours` int DEFAULT 24 NOT NULL;--> statement-breakpoint
ALTER TABLE `submissions` ADD `run_record_id` bigint unsigned;--> statement-breakpoint
ALTER TABLE `stand_modules` ADD CONSTRAINT `stand_modules_stand_id_stands_id_fk` FOREIGN KEY (`stand_id`) REFERENCES `stands`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `stand_modules` ADD CONSTRAINT `stand_modules_module_id_modules_id_fk` FOREIGN KEY (`module_id`) REFERENCES `modules`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `stand_slots` ADD CONSTRAINT `stand_slots_stand_id_stands_id_fk` FOREIGN KEY (`stand_id`) REFERENCES `stands`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `stand_slots` ADD CONSTRAINT `stand_slots_section_id_sections_id_fk` FOREIGN KEY (`section_id`) REFERENCES `sections`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `stand_slots` ADD CONSTRAINT `stand_slots_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `stands` ADD CONSTRAINT `stands_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `booking_waitlist` ADD CONSTRAINT `booking_waitlist_slot_id_stand_slots_id_fk` FOREIGN KEY (`slot_id`) REFERENCES `stand_slots`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `booking_waitlist` ADD CONSTRAINT `booking_waitlist_lab_group_id_lab_groups_id_fk` FOREIGN KEY (`lab_group_id`) REFERENCES `lab_groups`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `booking_waitlist` ADD CONSTRAINT `booking_waitlist_module_id_modules_id_fk` FOREIGN KEY (`module_id`) REFERENCES `modules`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `booking_waitlist` ADD CONSTRAINT `booking_waitlist_added_by_users_id_fk` FOREIGN KEY (`added_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bookings` ADD CONSTRAINT `bookings_slot_id_stand_slots_id_fk` FOREIGN KEY (`slot_id`) REFERENCES `stand_slots`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bookings` ADD CONSTRAINT `bookings_lab_group_id_lab_groups_id_fk` FOREIGN KEY (`lab_group_id`) REFERENCES `lab_groups`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bookings` ADD CONSTRAINT `bookings_module_id_modules_id_fk` FOREIGN KEY (`module_id`) REFERENCES `modules`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bookings` ADD CONSTRAINT `bookings_booked_by_users_id_fk` FOREIGN KEY (`booked_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `bookings` ADD CONSTRAINT `bookings_ended_by_users_id_fk` FOREIGN KEY (`ended_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_entries` ADD CONSTRAINT `run_entries_run_id_run_records_id_fk` FOREIGN KEY (`run_id`) REFERENCES `run_records`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_entries` ADD CONSTRAINT `run_entries_by_user_id_users_id_fk` FOREIGN KEY (`by_user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_people` ADD CONSTRAINT `run_people_run_id_run_records_id_fk` FOREIGN KEY (`run_id`) REFERENCES `run_records`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_people` ADD CONSTRAINT `run_people_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_records` ADD CONSTRAINT `run_records_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_records` ADD CONSTRAINT `run_records_booking_id_bookings_id_fk` FOREIGN KEY (`booking_id`) REFERENCES `bookings`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_records` ADD CONSTRAINT `run_records_module_version_id_module_versions_id_fk` FOREIGN KEY (`module_version_id`) REFERENCES `module_versions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_records` ADD CONSTRAINT `run_records_opened_by_users_id_fk` FOREIGN KEY (`opened_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `run_records` ADD CONSTRAINT `run_records_signed_off_by_users_id_fk` FOREIGN KEY (`signed_off_by`) REFERENCES `users`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `stand_modules_module_idx` ON `stand_modules` (`module_id`);--> statement-breakpoint
CREATE INDEX `stand_slots_section_start_idx` ON `stand_slots` (`section_id`,`starts_at`);--> statement-breakpoint
CREATE INDEX `stand_slots_start_idx` ON `stand_slots` (`starts_at`);--> statement-breakpoint
CREATE INDEX `bookings_slot_idx` ON `bookings` (`slot_id`);--> statement-breakpoint
CREATE INDEX `bookings_group_module_idx` ON `bookings` (`lab_group_id`,`module_id`,`status`);--> statement-breakpoint
CREATE INDEX `run_entries_run_idx` ON `run_entries` (`run_id`,`id`);--> statement-breakpoint
CREATE INDEX `run_records_course_idx` ON `run_records` (`course_id`);--> statement-breakpoint
ALTER TABLE `submissions` ADD CONSTRAINT `submissions_run_record_id_run_records_id_fk` FOREIGN KEY (`run_record_id`) REFERENCES `run_records`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE TRIGGER `run_entries_append_only_update` BEFORE UPDATE ON `run_entries` FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'run_entries is append-only: add a correction entry instead';--> statement-breakpoint
CREATE TRIGGER `run_entries_append_only_delete` BEFORE DELETE ON `run_entries` FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'run_entries is append-only: add a correction entry instead';
