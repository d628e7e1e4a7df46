CREATE TABLE `instruction_stations` (
	`instruction_id` bigint unsigned NOT NULL,
	`station_id` bigint unsigned NOT NULL,
	CONSTRAINT `instruction_stations_instruction_id_station_id_pk` PRIMARY KEY(`instruction_id`,`station_id`)
);
--> statement-breakpoint
CREATE TABLE `instructions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`doc_number` varchar(32) NOT NULL,
	`title` varchar(300) NOT NULL,
	`process_id` bigint unsigned,
	`owner_id` bigint unsigned NOT NULL,
	`review_due_on` date,
	`withdrawn_at` datetime(3),
	`withdrawn_reason` text,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `instructions_id` PRIMARY KEY(`id`),
	CONSTRAINT `instructions_docNumber_unique` UNIQUE(`doc_number`)
);
--> statement-breakpoint
CREATE TABLE `review_comments` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`revision_id` bigint unsigned NOT NULL,
	`author_id` bigint unsigned NOT NULL,
	`kind` enum('comment','rejection') NOT NULL DEFAULT 'comment',
	`body` text NOT NULL,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `review_comments_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `revision_files` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`revision_id` bigint unsigned NOT NULL,
	`kind` enum('image','attachment') NOT NULL,
	`storage_key` varchar(200) NOT NULL,
	`original_name` varchar(200) NOT NULL,
	`content_type` varchar(100) NOT NULL,
	`size_bytes` int NOT NULL,
	`sha256` char(64) NOT NULL,
	`width_px` int,
	`height_px` int,
	`uploaded_by` bigint unsigned NOT NULL,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `revision_files_id` PRIMARY KEY(`id`),
	CONSTRAINT `revision_files_storageKey_unique` UNIQUE(`storage_key`),
	CONSTRAINT `revision_files_name` UNIQUE(`revision_id`,`original_name`)
);
--> statement-breakpoint
CREATE TABLE `revisions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`instruction_id` bigint unsigned NOT NULL,
	`letter` varchar(3) NOT NULL,
	`state` enum('draft','in_review','approved','superseded') NOT NULL DEFAULT 'draft',
	`source` mediumtext NOT NULL,
	`content_hash` char(64) NOT NULL,
	`change_summary` text,
	`reason` text,
	`classification` enum('editorial','acknowledge','retraining'),
	`author_id` bigint unsigned NOT NULL,
	`last_edited_by` bigint unsigned,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	`submitted_at` datetime(3),
	`approved_at` datetime(3),
	`approved_by` bigint unsigned,
	`effective_from` datetime(3),
	`version` int NOT NULL DEFAULT 1,
	CONSTRAINT `revisions_id` PRIMARY KEY(`id`),
	CONSTRAINT `revisions_instruction_letter` UNIQUE(`instruction_id`,`letter`)
);
--> statement-breakpoint
CREATE TABLE `search_epoch` (
	`id` tinyint NOT NULL,
	`epoch` bigint unsigned NOT NULL,
	`changed_at` datetime(3) NOT NULL,
	CONSTRAINT `search_epoch_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `signature_failures` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`person_id` bigint unsigned NOT NULL,
	`at` datetime(3) NOT NULL,
	CONSTRAINT `signature_failures_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `signatures` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`record_type` varchar(32) NOT NULL,
	`record_id` bigint unsigned NOT NULL,
	`signer_id` bigint unsigned NOT NULL,
	`printed_name` varchar(200) NOT NULL,
	`meaning` enum('reviewed','approved') NOT NULL,
	`signed_at` datetime(3) NOT NULL,
	`content_hash` char(64) NOT NULL,
	`binding_hash` char(64) NOT NULL,
	CONSTRAINT `signatures_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `instruction_stations` ADD CONSTRAINT `instruction_stations_instruction_id_instructions_id_fk` FOREIGN KEY (`instruction_id`) REFERENCES `instructions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `instruction_stations` ADD CONSTRAINT `instruction_stations_station_id_stations_id_fk` FOREIGN KEY (`station_id`) REFERENCES `stations`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `instructions` ADD CONSTRAINT `instructions_process_id_processes_id_fk` FOREIGN KEY (`process_id`) REFERENCES `processes`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `instructions` ADD CONSTRAINT `instructions_owner_id_people_id_fk` FOREIGN KEY (`owner_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `review_comments` ADD CONSTRAINT `review_comments_revision_id_revisions_id_fk` FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `review_comments` ADD CONSTRAINT `review_comments_author_id_people_id_fk` FOREIGN KEY (`author_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `revision_files` ADD CONSTRAINT `revision_files_revision_id_revisions_id_fk` FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `revision_files` ADD CONSTRAINT `revision_files_uploaded_by_people_id_fk` FOREIGN KEY (`uploaded_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `revisions` ADD CONSTRAINT `revisions_instruction_id_instructions_id_fk` FOREIGN KEY (`instruction_id`) REFERENCES `instructions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `revisions` ADD CONSTRAINT `revisions_author_id_people_id_fk` FOREIGN KEY (`author_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `revisions` ADD CONSTRAINT `revisions_last_edited_by_people_id_fk` FOREIGN KEY (`last_edited_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `revisions` ADD CONSTRAINT `revisions_approved_by_people_id_fk` FOREIGN KEY (`approved_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signature_failures` ADD CONSTRAINT `signature_failures_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signatures` ADD CONSTRAINT `signatures_signer_id_people_id_fk` FOREIGN KEY (`signer_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `review_comments_revision` ON `review_comments` (`revision_id`);--> statement-breakpoint
CREATE INDEX `revisions_state_effective` ON `revisions` (`state`,`effective_from`);--> statement-breakpoint
CREATE INDEX `signature_failures_person` ON `signature_failures` (`person_id`,`at`);--> statement-breakpoint
CREATE INDEX `signatures_record` ON `signatures` (`record_type`,`record_id`);