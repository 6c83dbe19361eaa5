CREATE TABLE `course_strategies` (
	`id` int AUTO_INCREMENT NOT NULL,
	`course_id` int NOT NULL,
	`code` varchar(24) NOT NULL,
	`name` varchar(120) NOT NULL,
	`states` longtext NOT NULL,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `course_strategies_id` PRIMARY KEY(`id`),
	CONSTRAINT `course_strategies_code` UNIQUE(`course_id`,`code`)
);
--> statement-breakpoint
CREATE TABLE `designs` (
	`id` int AUTO_INCREMENT NOT NULL,
	`course_id` int NOT NULL,
	`name` varchar(120) NOT NULL,
	`params` longtext NOT NULL,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`archived_at` datetime(3),
	CONSTRAINT `designs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `course_strategies` ADD CONSTRAINT `course_strategies_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `course_strategies` ADD CONSTRAINT `course_strategies_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `designs` ADD CONSTRAINT `designs_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `designs` ADD CONSTRAINT `designs_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `designs_course` ON `designs` (`course_id`);