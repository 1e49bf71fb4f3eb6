CREATE TABLE `sign_in_throttles` (
	`scope` enum('account_address','address','account') NOT NULL,
	`email` varchar(254) NOT NULL DEFAULT '',
	`address` varchar(64) NOT NULL DEFAULT '',
	`failures` int unsigned NOT NULL DEFAULT 0,
	`last_failed_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `sign_in_throttles_pk` PRIMARY KEY(`scope`,`email`,`address`)
);
--> statement-breakpoint
DROP TABLE `sign_in_failures`;--> statement-breakpoint
CREATE INDEX `sign_in_throttles_last_failed_idx` ON `sign_in_throttles` (`last_failed_at`);