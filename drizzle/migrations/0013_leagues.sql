CREATE TABLE `league_entries` (
	`id` int AUTO_INCREMENT NOT NULL,
	`league_id` int NOT NULL,
	`user_id` int,
	`house` boolean NOT NULL DEFAULT false,
	`name` varchar(60) NOT NULL,
	`automaton_json` longtext NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `league_entries_id` PRIMARY KEY(`id`),
	CONSTRAINT `league_entries_user` UNIQUE(`league_id`,`user_id`)
);
--> statement-breakpoint
CREATE TABLE `leagues` (
	`id` int AUTO_INCREMENT NOT NULL,
	`course_id` int NOT NULL,
	`title` varchar(120) NOT NULL,
	`design_json` longtext NOT NULL,
	`deadline` datetime(3),
	`state` enum('open','closed','run','published') NOT NULL DEFAULT 'open',
	`results_json` longtext,
	`run_status` enum('none','queued','running','done','failed') NOT NULL DEFAULT 'none',
	`run_progress` int NOT NULL DEFAULT 0,
	`run_total` int NOT NULL DEFAULT 0,
	`run_error` varchar(500),
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`closed_at` datetime(3),
	`run_at` datetime(3),
	`published_at` datetime(3),
	`comparison_session_id` int,
	CONSTRAINT `leagues_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `league_entries` ADD CONSTRAINT `league_entries_league_id_leagues_id_fk` FOREIGN KEY (`league_id`) REFERENCES `leagues`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `league_entries` ADD CONSTRAINT `league_entries_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `leagues` ADD CONSTRAINT `leagues_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `leagues` ADD CONSTRAINT `leagues_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `leagues` ADD CONSTRAINT `leagues_comparison_session_id_sessions_id_fk` FOREIGN KEY (`comparison_session_id`) REFERENCES `sessions`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `leagues_course` ON `leagues` (`course_id`);