ALTER TABLE `courses` MODIFY COLUMN `is_demo` boolean NOT NULL DEFAULT false;--> statement-breakpoint
ALTER TABLE `sessions` MODIFY COLUMN `simulated` boolean NOT NULL DEFAULT false;--> statement-breakpoint
ALTER TABLE `users` MODIFY COLUMN `may_create_courses` boolean NOT NULL DEFAULT false;
