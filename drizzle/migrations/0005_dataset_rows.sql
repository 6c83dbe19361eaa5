CREATE TABLE `dataset_rows` (
	`dataset_id` int NOT NULL,
	`seq` int NOT NULL,
	`session` text NOT NULL,
	`treatment` text NOT NULL,
	`subject` text NOT NULL,
	`partner` text NOT NULL,
	`supergame` int NOT NULL,
	`round` int NOT NULL,
	`action` enum('C','D') NOT NULL,
	`partner_action` enum('C','D') NOT NULL,
	CONSTRAINT `dataset_rows_dataset_id_seq_pk` PRIMARY KEY(`dataset_id`,`seq`)
);
--> statement-breakpoint
ALTER TABLE `dataset_rows` ADD CONSTRAINT `dataset_rows_dataset_id_datasets_id_fk` FOREIGN KEY (`dataset_id`) REFERENCES `datasets`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
-- Hand-written (keep when regenerating): datasets stored before this migration keep their rows,
-- copied from the JSON array in file order (seq from 0) before the column goes.
INSERT INTO `dataset_rows` (`dataset_id`, `seq`, `session`, `treatment`, `subject`, `partner`, `supergame`, `round`, `action`, `partner_action`)
SELECT d.`id`, j.`seq` - 1, j.`session`, j.`treatment`, j.`subject`, j.`partner`, j.`supergame`, j.`round`, j.`action`, j.`partner_action`
FROM `datasets` d, JSON_TABLE(d.`rows`, '$[*]' COLUMNS (
	`seq` FOR ORDINALITY,
	`session` TEXT PATH '$.session',
	`treatment` TEXT PATH '$.treatment',
	`subject` TEXT PATH '$.subject',
	`partner` TEXT PATH '$.partner',
	`supergame` INT PATH '$.supergame',
	`round` INT PATH '$.round',
	`action` VARCHAR(1) PATH '$.action',
	`partner_action` VARCHAR(1) PATH '$.partnerAction'
)) AS j;--> statement-breakpoint
ALTER TABLE `datasets` DROP COLUMN `rows`;