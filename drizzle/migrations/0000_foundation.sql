CREATE TABLE `auth_events` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`kind` enum('code-request','code-failure','sign-in') NOT NULL,
	`email` varchar(254) NOT NULL,
	`ip` varchar(64) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `auth_events_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `course_members` (
	`id` int AUTO_INCREMENT NOT NULL,
	`course_id` int NOT NULL,
	`user_id` int NOT NULL,
	`role` enum('instructor','assistant','researcher','participant') NOT NULL,
	`student_id` varchar(60),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `course_members_id` PRIMARY KEY(`id`),
	CONSTRAINT `course_members_course_user` UNIQUE(`course_id`,`user_id`)
);
--> statement-breakpoint
CREATE TABLE `courses` (
	`id` int AUTO_INCREMENT NOT NULL,
	`title` varchar(160) NOT NULL,
	`institution` varchar(160),
	`term` varchar(60),
	`is_demo` int NOT NULL DEFAULT 0,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`archived_at` datetime(3),
	CONSTRAINT `courses_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `invitations` (
	`id` int AUTO_INCREMENT NOT NULL,
	`course_id` int NOT NULL,
	`email` varchar(254) NOT NULL,
	`role` enum('instructor','assistant','researcher','participant') NOT NULL,
	`token_hash` varchar(64) NOT NULL,
	`invited_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`expires_at` datetime(3) NOT NULL,
	`accepted_at` datetime(3),
	`revoked_at` datetime(3),
	CONSTRAINT `invitations_id` PRIMARY KEY(`id`),
	CONSTRAINT `invitations_token_hash_unique` UNIQUE(`token_hash`)
);
--> statement-breakpoint
CREATE TABLE `users` (
	`id` int AUTO_INCREMENT NOT NULL,
	`email` varchar(254) NOT NULL,
	`name` varchar(120),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`last_sign_in_at` datetime(3),
	CONSTRAINT `users_id` PRIMARY KEY(`id`),
	CONSTRAINT `users_email_unique` UNIQUE(`email`)
);
--> statement-breakpoint
ALTER TABLE `course_members` ADD CONSTRAINT `course_members_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `course_members` ADD CONSTRAINT `course_members_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `courses` ADD CONSTRAINT `courses_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `invitations` ADD CONSTRAINT `invitations_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `invitations` ADD CONSTRAINT `invitations_invited_by_users_id_fk` FOREIGN KEY (`invited_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `auth_events_email` ON `auth_events` (`kind`,`email`,`created_at`);--> statement-breakpoint
CREATE INDEX `auth_events_ip` ON `auth_events` (`kind`,`ip`,`created_at`);--> statement-breakpoint
CREATE INDEX `course_members_user` ON `course_members` (`user_id`);--> statement-breakpoint
CREATE INDEX `invitations_course` ON `invitations` (`course_id`);--> statement-breakpoint
CREATE INDEX `invitations_email` ON `invitations` (`email`);