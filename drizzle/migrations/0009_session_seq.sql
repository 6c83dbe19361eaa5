ALTER TABLE `sessions` ADD `seq` int DEFAULT 0 NOT NULL;--> statement-breakpoint
UPDATE `sessions` SET `seq` = GREATEST(
  COALESCE((SELECT MAX(`seq`) FROM `choices` WHERE `choices`.`session_id` = `sessions`.`id`), 0),
  COALESCE((SELECT MAX(`seq`) FROM `session_log` WHERE `session_log`.`session_id` = `sessions`.`id`), 0),
  COALESCE((SELECT MAX(`seq`) FROM `session_participants` WHERE `session_participants`.`session_id` = `sessions`.`id`), 0));
