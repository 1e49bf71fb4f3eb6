CREATE TABLE `calendar_tokens` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`token_hash` char(64) NOT NULL,
	`created_at` timestamp(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `calendar_tokens_id` PRIMARY KEY(`id`),
	CONSTRAINT `calendar_tokens_user_uq` UNIQUE(`user_id`),
	CONSTRAINT `calendar_tokens_hash_uq` UNIQUE(`token_hash`)
);
--> statement-breakpoint
ALTER TABLE `calendar_tokens` ADD CONSTRAINT `calendar_tokens_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;