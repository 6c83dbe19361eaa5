CREATE TABLE `jobs` (
	`id` int AUTO_INCREMENT NOT NULL,
	`kind` varchar(40) NOT NULL,
	`course_id` int,
	`payload` longtext NOT NULL,
	`state` enum('queued','running','done','failed') NOT NULL DEFAULT 'queued',
	`active_key` varchar(100),
	`again` boolean NOT NULL DEFAULT false,
	`attempts` int NOT NULL DEFAULT 0,
	`lease_owner` varchar(80),
	`lease_until` datetime(3),
	`run_after` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`error` varchar(500),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`started_at` datetime(3),
	`finished_at` datetime(3),
	CONSTRAINT `jobs_id` PRIMARY KEY(`id`),
	CONSTRAINT `jobs_active_key` UNIQUE(`active_key`)
);
--> statement-breakpoint
ALTER TABLE `jobs` ADD CONSTRAINT `jobs_course_id_courses_id_fk` FOREIGN KEY (`course_id`) REFERENCES `courses`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `jobs_ready` ON `jobs` (`kind`,`state`,`run_after`);--> statement-breakpoint
CREATE INDEX `jobs_served` ON `jobs` (`kind`,`course_id`,`started_at`);