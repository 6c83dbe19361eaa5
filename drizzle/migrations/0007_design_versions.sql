ALTER TABLE `designs` ADD `previous_id` int;--> statement-breakpoint
ALTER TABLE `designs` ADD `version` int DEFAULT 1 NOT NULL;--> statement-breakpoint
ALTER TABLE `designs` ADD CONSTRAINT `designs_previous_id_designs_id_fk` FOREIGN KEY (`previous_id`) REFERENCES `designs`(`id`) ON DELETE set null ON UPDATE no action;