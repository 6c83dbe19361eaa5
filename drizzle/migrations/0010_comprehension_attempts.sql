CREATE TABLE `comprehension_attempts` (
	`id` int AUTO_INCREMENT NOT NULL,
	`session_id` int NOT NULL,
	`user_id` int NOT NULL,
	`attempts` int NOT NULL DEFAULT 0,
	`last_wrong` varchar(64),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3),
	`passed_at` datetime(3),
	CONSTRAINT `comprehension_attempts_id` PRIMARY KEY(`id`),
	CONSTRAINT `comprehension_attempts_user` UNIQUE(`session_id`,`user_id`)
);
--> statement-breakpoint
ALTER TABLE `comprehension_attempts` ADD CONSTRAINT `comprehension_attempts_session_id_sessions_id_fk` FOREIGN KEY (`session_id`) REFERENCES `sessions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `comprehension_attempts` ADD CONSTRAINT `comprehension_attempts_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;