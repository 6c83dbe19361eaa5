CREATE TABLE `choices` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`session_id` int NOT NULL,
	`seq` int NOT NULL,
	`supergame` int NOT NULL,
	`round` int NOT NULL,
	`pair_id` varchar(32) NOT NULL,
	`seat` int NOT NULL,
	`participant_key` varchar(32),
	`action` enum('C','D') NOT NULL,
	`source` enum('player','timeout','computer') NOT NULL,
	`strategy` varchar(24),
	`client_choice_id` varchar(64),
	`at_ms` bigint NOT NULL,
	`decision_ms` int NOT NULL,
	CONSTRAINT `choices_id` PRIMARY KEY(`id`),
	CONSTRAINT `choices_seq` UNIQUE(`session_id`,`seq`),
	CONSTRAINT `choices_seat_round` UNIQUE(`session_id`,`supergame`,`round`,`pair_id`,`seat`)
);
--> statement-breakpoint
CREATE TABLE `session_log` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`session_id` int NOT NULL,
	`seq` int NOT NULL,
	`at_ms` bigint NOT NULL,
	`event` longtext NOT NULL,
	`user_id` int,
	CONSTRAINT `session_log_id` PRIMARY KEY(`id`),
	CONSTRAINT `session_log_seq` UNIQUE(`session_id`,`seq`)
);
--> statement-breakpoint
CREATE TABLE `session_pairs` (
	`session_id` int NOT NULL,
	`supergame` int NOT NULL,
	`pair_id` varchar(32) NOT NULL,
	`seat0` varchar(32),
	`seat1` varchar(32),
	`computer_strategy` varchar(24),
	CONSTRAINT `session_pairs_session_id_supergame_pair_id_pk` PRIMARY KEY(`session_id`,`supergame`,`pair_id`)
);
--> statement-breakpoint
CREATE TABLE `session_participants` (
	`id` int AUTO_INCREMENT NOT NULL,
	`session_id` int NOT NULL,
	`user_id` int NOT NULL,
	`participant_key` varchar(32) NOT NULL,
	`pseudonym` varchar(16) NOT NULL,
	`seq` int NOT NULL,
	`joined_at_ms` bigint NOT NULL,
	`consent` int,
	`consent_at` datetime(3),
	CONSTRAINT `session_participants_id` PRIMARY KEY(`id`),
	CONSTRAINT `session_participants_user` UNIQUE(`session_id`,`user_id`),
	CONSTRAINT `session_participants_seq` UNIQUE(`session_id`,`seq`),
	CONSTRAINT `session_participants_pseudonym` UNIQUE(`session_id`,`pseudonym`)
);
--> statement-breakpoint
CREATE TABLE `sessions` (
	`id` int AUTO_INCREMENT NOT NULL,
	`course_id` int NOT NULL,
	`design_id` int,
	`treatment` varchar(120) NOT NULL,
	`params` longtext NOT NULL,
	`seed` bigint unsigned NOT NULL,
	`join_code` varchar(8),
	`status` enum('draft','open','running','paused','complete','archived') NOT NULL DEFAULT 'draft',
	`current_supergame` int NOT NULL DEFAULT 0,
	`admission` enum('roster','open') NOT NULL DEFAULT 'roster',
	`email_domain` varchar(120),
	`simulated` int NOT NULL DEFAULT 0,
	`created_by` int NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`started_at` datetime(3),
	`completed_at` datetime(3),
	CONSTRAINT `sessions_id` PRIMARY KEY(`id`),
	CONSTRAINT `sessions_join_code_unique` UNIQUE(`join_code`)
);
--> statement-breakpoint
CREATE TABLE `supergame_draws` (
	`session_id` int NOT NULL,
	`supergame` int NOT NULL,
	`draws` longtext NOT NULL,
	`length` int NOT NULL,
	`rounds_played` int NOT NULL,
	CONSTRAINT `supergame_draws_session_id_supergame_pk` PRIMARY KEY(`session_id`,`supergame`)
);
--> statement-breakpoint
ALTER TABLE `choices` ADD CONSTRAINT `choices_session_id_sessions_id_fk` FOREIGN KEY (`session_id`) REFERENCES `sessions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `session_log` ADD CONSTRAINT `session_log_session_id_sessions_id_fk` FOREIGN KEY (`session_id`) REFERENCES `sessions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `session_pairs` ADD CONSTRAINT `session_pairs_session_id_sessions_id_fk` FOREIGN KEY (`session_id`) REFERENCES `sessions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `session_participants` ADD CONSTRAINT `session_participants_session_id_sessions_id_fk` FOREIGN KEY (`session_id`) REFERENCES `sessions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `session_participants` ADD CONSTRAINT `session_participants_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `sessions` ADD CONSTRAINT `sessions_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `sessions` ADD CONSTRAINT `sessions_design_id_designs_id_fk` FOREIGN KEY (`design_id`) REFERENCES `designs`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `sessions` ADD CONSTRAINT `sessions_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `supergame_draws` ADD CONSTRAINT `supergame_draws_session_id_sessions_id_fk` FOREIGN KEY (`session_id`) REFERENCES `sessions`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `choices_participant` ON `choices` (`session_id`,`participant_key`);--> statement-breakpoint
CREATE INDEX `sessions_course` ON `sessions` (`course_id`);