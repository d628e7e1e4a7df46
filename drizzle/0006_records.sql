CREATE TABLE `legal_holds` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`person_id` bigint unsigned NOT NULL,
	`reason` text NOT NULL,
	`placed_by` bigint unsigned NOT NULL,
	`placed_at` datetime(3) NOT NULL,
	`released_by` bigint unsigned,
	`released_at` datetime(3),
	`release_reason` text,
	CONSTRAINT `legal_holds_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `retention_dispositions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`run_id` bigint unsigned NOT NULL,
	`record_type` enum('training_records','gate_log') NOT NULL,
	`entity_type` varchar(64) NOT NULL,
	`entity_id` varchar(64) NOT NULL,
	`action` enum('anonymised','deleted') NOT NULL,
	`detail` json NOT NULL,
	`at` datetime(3) NOT NULL,
	CONSTRAINT `retention_dispositions_id` PRIMARY KEY(`id`),
	CONSTRAINT `retention_dispositions_once` UNIQUE(`record_type`,`entity_type`,`entity_id`,`action`)
);
--> statement-breakpoint
CREATE TABLE `retention_rules` (
	`record_type` enum('training_records','gate_log') NOT NULL,
	`years` int NOT NULL,
	`updated_by` bigint unsigned,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `retention_rules_record_type` PRIMARY KEY(`record_type`)
);
--> statement-breakpoint
CREATE TABLE `retention_runs` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`dry_run` boolean NOT NULL,
	`actor_id` bigint unsigned,
	`started_at` datetime(3) NOT NULL,
	`finished_at` datetime(3),
	`summary` json,
	CONSTRAINT `retention_runs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `retired_identifiers` (
	`kind` enum('employee_no','badge_no','email') NOT NULL,
	`value_sha256` char(64) NOT NULL,
	`retired_at` datetime(3) NOT NULL,
	CONSTRAINT `retired_identifiers_kind_value_sha256_pk` PRIMARY KEY(`kind`,`value_sha256`)
);
--> statement-breakpoint
ALTER TABLE `people` ADD `employment_ended_on` date;--> statement-breakpoint
ALTER TABLE `people` ADD `anonymised_at` datetime(3);--> statement-breakpoint
ALTER TABLE `legal_holds` ADD CONSTRAINT `legal_holds_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `legal_holds` ADD CONSTRAINT `legal_holds_placed_by_people_id_fk` FOREIGN KEY (`placed_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `legal_holds` ADD CONSTRAINT `legal_holds_released_by_people_id_fk` FOREIGN KEY (`released_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `retention_dispositions` ADD CONSTRAINT `retention_dispositions_run_id_retention_runs_id_fk` FOREIGN KEY (`run_id`) REFERENCES `retention_runs`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `retention_rules` ADD CONSTRAINT `retention_rules_updated_by_people_id_fk` FOREIGN KEY (`updated_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `retention_runs` ADD CONSTRAINT `retention_runs_actor_id_people_id_fk` FOREIGN KEY (`actor_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `legal_holds_person` ON `legal_holds` (`person_id`,`released_at`);--> statement-breakpoint
CREATE INDEX `retention_dispositions_run` ON `retention_dispositions` (`run_id`);