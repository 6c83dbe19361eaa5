CREATE TABLE `course_mails` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`course_id` int NOT NULL,
	`kind` enum('invitation','roster') NOT NULL,
	`email` varchar(254) NOT NULL,
	`sent_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `course_mails_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `course_members` ADD `name` varchar(120);--> statement-breakpoint
ALTER TABLE `invitations` ADD `sent_at` datetime(3) DEFAULT CURRENT_TIMESTAMP(3);--> statement-breakpoint
ALTER TABLE `users` ADD `may_create_courses` int DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `course_mails` ADD CONSTRAINT `course_mails_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `course_mails` ADD CONSTRAINT `course_mails_sent_by_users_id_fk` FOREIGN KEY (`sent_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `course_mails_course` ON `course_mails` (`course_id`,`created_at`);