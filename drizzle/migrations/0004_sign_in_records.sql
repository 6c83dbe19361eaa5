CREATE TABLE `auth_sessions` (
	`id` varchar(64) NOT NULL,
	`user_id` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`last_seen_at` datetime(3) NOT NULL,
	`expires_at` datetime(3) NOT NULL,
	`ip` varchar(64) NOT NULL,
	`user_agent` varchar(255),
	CONSTRAINT `auth_sessions_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `sign_in_codes` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`token_hash` varchar(64) NOT NULL,
	`email` varchar(254) NOT NULL,
	`ip` varchar(64) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`expires_at` datetime(3) NOT NULL,
	`failures` int NOT NULL DEFAULT 0,
	`used_at` datetime(3),
	CONSTRAINT `sign_in_codes_id` PRIMARY KEY(`id`),
	CONSTRAINT `sign_in_codes_token_hash_unique` UNIQUE(`token_hash`)
);
--> statement-breakpoint
ALTER TABLE `auth_sessions` ADD CONSTRAINT `auth_sessions_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `auth_sessions_user` ON `auth_sessions` (`user_id`);--> statement-breakpoint
CREATE INDEX `auth_sessions_expires` ON `auth_sessions` (`expires_at`);--> statement-breakpoint
CREATE INDEX `sign_in_codes_email` ON `sign_in_codes` (`email`,`created_at`);--> statement-breakpoint
CREATE INDEX `sign_in_codes_ip` ON `sign_in_codes` (`ip`,`created_at`);