CREATE TABLE `auth_sessions` (
	`id` varchar(43) NOT NULL,
	`person_id` bigint unsigned NOT NULL,
	`session_version` int NOT NULL,
	`method` enum('password','badge') NOT NULL,
	`address` varchar(64),
	`created_at` datetime(3) NOT NULL,
	`expires_at` datetime(3) NOT NULL,
	`revoked_at` datetime(3),
	CONSTRAINT `auth_sessions_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `lines` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`site_id` bigint unsigned NOT NULL,
	`code` varchar(16) NOT NULL,
	`name` varchar(200) NOT NULL,
	`active` boolean NOT NULL DEFAULT true,
	CONSTRAINT `lines_id` PRIMARY KEY(`id`),
	CONSTRAINT `lines_site_code` UNIQUE(`site_id`,`code`)
);
--> statement-breakpoint
CREATE TABLE `people` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`employee_no` varchar(32) NOT NULL,
	`display_name` varchar(200) NOT NULL,
	`email` varchar(254),
	`badge_no` varchar(64),
	`locale` varchar(16) NOT NULL DEFAULT 'en',
	`employment_type` enum('employee','agency','contractor') NOT NULL DEFAULT 'employee',
	`agency_name` varchar(200),
	`contract_ends_on` date,
	`site_id` bigint unsigned,
	`line_id` bigint unsigned,
	`shift_id` bigint unsigned,
	`active` boolean NOT NULL DEFAULT true,
	`password_hash` varchar(255),
	`pin_hash` varchar(255),
	`session_version` int NOT NULL DEFAULT 1,
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `people_id` PRIMARY KEY(`id`),
	CONSTRAINT `people_employeeNo_unique` UNIQUE(`employee_no`),
	CONSTRAINT `people_email_unique` UNIQUE(`email`),
	CONSTRAINT `people_badgeNo_unique` UNIQUE(`badge_no`)
);
--> statement-breakpoint
CREATE TABLE `role_assignments` (
	`person_id` bigint unsigned NOT NULL,
	`role` enum('operator','trainer','quality','lead','hr','admin') NOT NULL,
	`granted_at` datetime(3) NOT NULL,
	CONSTRAINT `role_assignments_person_id_role_pk` PRIMARY KEY(`person_id`,`role`)
);
--> statement-breakpoint
CREATE TABLE `shifts` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`site_id` bigint unsigned NOT NULL,
	`code` varchar(16) NOT NULL,
	`name` varchar(100) NOT NULL,
	`starts_at` varchar(5) NOT NULL,
	`ends_at` varchar(5) NOT NULL,
	CONSTRAINT `shifts_id` PRIMARY KEY(`id`),
	CONSTRAINT `shifts_site_code` UNIQUE(`site_id`,`code`)
);
--> statement-breakpoint
CREATE TABLE `sign_in_failures` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`key_type` enum('account','address') NOT NULL,
	`key_value` varchar(255) NOT NULL,
	`at` datetime(3) NOT NULL,
	CONSTRAINT `sign_in_failures_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `sites` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`code` varchar(16) NOT NULL,
	`name` varchar(200) NOT NULL,
	`time_zone` varchar(64) NOT NULL,
	CONSTRAINT `sites_id` PRIMARY KEY(`id`),
	CONSTRAINT `sites_code_unique` UNIQUE(`code`)
);
--> statement-breakpoint
CREATE TABLE `api_keys` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`name` varchar(200) NOT NULL,
	`prefix` varchar(16) NOT NULL,
	`secret_hash` varchar(64) NOT NULL,
	`scope` enum('gate','calculators') NOT NULL,
	`station_id` bigint unsigned,
	`created_by` bigint unsigned,
	`created_at` datetime(3) NOT NULL,
	`revoked_at` datetime(3),
	`last_used_at` datetime(3),
	CONSTRAINT `api_keys_id` PRIMARY KEY(`id`),
	CONSTRAINT `api_keys_secretHash_unique` UNIQUE(`secret_hash`)
);
--> statement-breakpoint
CREATE TABLE `processes` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`code` varchar(32) NOT NULL,
	`name` varchar(200) NOT NULL,
	`bond_type` enum('ACF','COG','FOG','FOB','COF','INSP','GEN') NOT NULL,
	`active` boolean NOT NULL DEFAULT true,
	CONSTRAINT `processes_id` PRIMARY KEY(`id`),
	CONSTRAINT `processes_code_unique` UNIQUE(`code`)
);
--> statement-breakpoint
CREATE TABLE `station_processes` (
	`station_id` bigint unsigned NOT NULL,
	`process_id` bigint unsigned NOT NULL,
	CONSTRAINT `station_processes_station_id_process_id_pk` PRIMARY KEY(`station_id`,`process_id`)
);
--> statement-breakpoint
CREATE TABLE `stations` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`line_id` bigint unsigned NOT NULL,
	`code` varchar(32) NOT NULL,
	`name` varchar(200) NOT NULL,
	`min_qualified` int NOT NULL DEFAULT 2,
	`active` boolean NOT NULL DEFAULT true,
	CONSTRAINT `stations_id` PRIMARY KEY(`id`),
	CONSTRAINT `stations_code_unique` UNIQUE(`code`)
);
--> statement-breakpoint
CREATE TABLE `audit_chain` (
	`id` tinyint NOT NULL,
	`last_seq` bigint unsigned NOT NULL,
	`last_hash` char(64) NOT NULL,
	CONSTRAINT `audit_chain_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `audit_events` (
	`seq` bigint unsigned NOT NULL,
	`at` datetime(3) NOT NULL,
	`actor_id` bigint unsigned,
	`actor_label` varchar(200) NOT NULL,
	`action` varchar(64) NOT NULL,
	`entity_type` varchar(64) NOT NULL,
	`entity_id` varchar(64),
	`old_values` json,
	`new_values` json,
	`reason` text,
	`address` varchar(64),
	`prev_hash` char(64) NOT NULL,
	`hash` char(64) NOT NULL,
	CONSTRAINT `audit_events_seq` PRIMARY KEY(`seq`)
);
--> statement-breakpoint
ALTER TABLE `auth_sessions` ADD CONSTRAINT `auth_sessions_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `lines` ADD CONSTRAINT `lines_site_id_sites_id_fk` FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `people` ADD CONSTRAINT `people_site_id_sites_id_fk` FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `people` ADD CONSTRAINT `people_line_id_lines_id_fk` FOREIGN KEY (`line_id`) REFERENCES `lines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `people` ADD CONSTRAINT `people_shift_id_shifts_id_fk` FOREIGN KEY (`shift_id`) REFERENCES `shifts`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `role_assignments` ADD CONSTRAINT `role_assignments_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `shifts` ADD CONSTRAINT `shifts_site_id_sites_id_fk` FOREIGN KEY (`site_id`) REFERENCES `sites`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `api_keys` ADD CONSTRAINT `api_keys_station_id_stations_id_fk` FOREIGN KEY (`station_id`) REFERENCES `stations`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `api_keys` ADD CONSTRAINT `api_keys_created_by_people_id_fk` FOREIGN KEY (`created_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `station_processes` ADD CONSTRAINT `station_processes_station_id_stations_id_fk` FOREIGN KEY (`station_id`) REFERENCES `stations`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `station_processes` ADD CONSTRAINT `station_processes_process_id_processes_id_fk` FOREIGN KEY (`process_id`) REFERENCES `processes`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `stations` ADD CONSTRAINT `stations_line_id_lines_id_fk` FOREIGN KEY (`line_id`) REFERENCES `lines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `auth_sessions_person` ON `auth_sessions` (`person_id`);--> statement-breakpoint
CREATE INDEX `people_line` ON `people` (`line_id`);--> statement-breakpoint
CREATE INDEX `people_active` ON `people` (`active`);--> statement-breakpoint
CREATE INDEX `sign_in_failures_key` ON `sign_in_failures` (`key_type`,`key_value`,`at`);--> statement-breakpoint
CREATE INDEX `audit_entity` ON `audit_events` (`entity_type`,`entity_id`);--> statement-breakpoint
CREATE INDEX `audit_actor` ON `audit_events` (`actor_id`);--> statement-breakpoint
CREATE INDEX `audit_at` ON `audit_events` (`at`);--> statement-breakpoint
CREATE INDEX `audit_action` ON `audit_events` (`action`);