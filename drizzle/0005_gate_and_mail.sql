CREATE TABLE `gate_checks` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`at` datetime(3) NOT NULL,
	`station_id` bigint unsigned,
	`station_code` varchar(64) NOT NULL,
	`badge` varchar(64) NOT NULL,
	`person_id` bigint unsigned,
	`decision` enum('allow','deny') NOT NULL,
	`reasons` json NOT NULL,
	`warnings` json NOT NULL,
	`source` enum('api','kiosk') NOT NULL,
	`api_key_id` bigint unsigned,
	`latency_ms` int NOT NULL,
	CONSTRAINT `gate_checks_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `mail_outbox` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`dedupe_key` varchar(200) NOT NULL,
	`kind` enum('review_requested','retraining_needed','assignment','expiring_30','expiring_7','suspended','supervised_run','lead_digest') NOT NULL,
	`to_address` varchar(254) NOT NULL,
	`to_person_id` bigint unsigned,
	`about_person_id` bigint unsigned,
	`subject` varchar(300) NOT NULL,
	`text_body` text NOT NULL,
	`html_body` text NOT NULL,
	`created_at` datetime(3) NOT NULL,
	`send_after` datetime(3) NOT NULL,
	`attempts` int NOT NULL DEFAULT 0,
	`last_error` text,
	`claimed_by` varchar(100),
	`claimed_until` datetime(3),
	`sent_at` datetime(3),
	`message_id` varchar(300),
	CONSTRAINT `mail_outbox_id` PRIMARY KEY(`id`),
	CONSTRAINT `mail_outbox_dedupeKey_unique` UNIQUE(`dedupe_key`)
);
--> statement-breakpoint
CREATE TABLE `supervised_runs` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`person_id` bigint unsigned NOT NULL,
	`station_id` bigint unsigned NOT NULL,
	`supervisor_id` bigint unsigned NOT NULL,
	`granted_by` bigint unsigned NOT NULL,
	`reason` text NOT NULL,
	`starts_at` datetime(3) NOT NULL,
	`ends_at` datetime(3) NOT NULL,
	`revoked_at` datetime(3),
	`revoked_by` bigint unsigned,
	`revoke_reason` text,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `supervised_runs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `gate_checks` ADD CONSTRAINT `gate_checks_station_id_stations_id_fk` FOREIGN KEY (`station_id`) REFERENCES `stations`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `gate_checks` ADD CONSTRAINT `gate_checks_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `gate_checks` ADD CONSTRAINT `gate_checks_api_key_id_api_keys_id_fk` FOREIGN KEY (`api_key_id`) REFERENCES `api_keys`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `mail_outbox` ADD CONSTRAINT `mail_outbox_to_person_id_people_id_fk` FOREIGN KEY (`to_person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `mail_outbox` ADD CONSTRAINT `mail_outbox_about_person_id_people_id_fk` FOREIGN KEY (`about_person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `supervised_runs` ADD CONSTRAINT `supervised_runs_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `supervised_runs` ADD CONSTRAINT `supervised_runs_station_id_stations_id_fk` FOREIGN KEY (`station_id`) REFERENCES `stations`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `supervised_runs` ADD CONSTRAINT `supervised_runs_supervisor_id_people_id_fk` FOREIGN KEY (`supervisor_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `supervised_runs` ADD CONSTRAINT `supervised_runs_granted_by_people_id_fk` FOREIGN KEY (`granted_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `supervised_runs` ADD CONSTRAINT `supervised_runs_revoked_by_people_id_fk` FOREIGN KEY (`revoked_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `gate_checks_station_at` ON `gate_checks` (`station_id`,`at`);--> statement-breakpoint
CREATE INDEX `gate_checks_person_at` ON `gate_checks` (`person_id`,`at`);--> statement-breakpoint
CREATE INDEX `gate_checks_at` ON `gate_checks` (`at`);--> statement-breakpoint
CREATE INDEX `mail_outbox_pending` ON `mail_outbox` (`sent_at`,`send_after`);--> statement-breakpoint
CREATE INDEX `mail_outbox_to` ON `mail_outbox` (`to_person_id`);--> statement-breakpoint
CREATE INDEX `mail_outbox_about` ON `mail_outbox` (`about_person_id`);--> statement-breakpoint
CREATE INDEX `supervised_runs_person_station` ON `supervised_runs` (`person_id`,`station_id`,`ends_at`);