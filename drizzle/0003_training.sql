CREATE TABLE `acknowledgements` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`person_id` bigint unsigned NOT NULL,
	`revision_id` bigint unsigned NOT NULL,
	`method` enum('pin','password') NOT NULL,
	`content_hash` char(64) NOT NULL,
	`acknowledged_at` datetime(3) NOT NULL,
	CONSTRAINT `acknowledgements_id` PRIMARY KEY(`id`),
	CONSTRAINT `acknowledgements_person_revision` UNIQUE(`person_id`,`revision_id`)
);
--> statement-breakpoint
CREATE TABLE `assignments` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`person_id` bigint unsigned NOT NULL,
	`process_id` bigint unsigned NOT NULL,
	`scope` enum('person','line','station') NOT NULL DEFAULT 'person',
	`line_id` bigint unsigned,
	`station_id` bigint unsigned,
	`due_on` date,
	`assigned_by` bigint unsigned NOT NULL,
	`assigned_at` datetime(3) NOT NULL,
	`closed_at` datetime(3),
	`closed_reason` varchar(200),
	CONSTRAINT `assignments_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `attempt_items` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`attempt_id` bigint unsigned NOT NULL,
	`question_id` bigint unsigned NOT NULL,
	`position` int NOT NULL,
	`params` json,
	`prompt` text NOT NULL,
	`choice_order` json,
	`answer_key` json NOT NULL,
	`response` json,
	`correct` boolean,
	`points_awarded` int,
	CONSTRAINT `attempt_items_id` PRIMARY KEY(`id`),
	CONSTRAINT `attempt_items_attempt_position` UNIQUE(`attempt_id`,`position`)
);
--> statement-breakpoint
CREATE TABLE `certification_rules` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`process_id` bigint unsigned NOT NULL,
	`version` int NOT NULL,
	`check_id` bigint unsigned,
	`pass_mark_pct` int NOT NULL DEFAULT 80,
	`practical_required` boolean NOT NULL DEFAULT true,
	`checklist_id` bigint unsigned,
	`validity_months` int NOT NULL DEFAULT 12,
	`grace_days` int NOT NULL DEFAULT 14,
	`reminder_days` json NOT NULL,
	`show_full_name_on_verify` boolean NOT NULL DEFAULT false,
	`note` text,
	`created_by` bigint unsigned NOT NULL,
	`created_at` datetime(3) NOT NULL,
	`active_from` datetime(3) NOT NULL,
	CONSTRAINT `certification_rules_id` PRIMARY KEY(`id`),
	CONSTRAINT `certification_rules_process_version` UNIQUE(`process_id`,`version`)
);
--> statement-breakpoint
CREATE TABLE `check_attempts` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`person_id` bigint unsigned NOT NULL,
	`check_version_id` bigint unsigned NOT NULL,
	`process_id` bigint unsigned NOT NULL,
	`pass_mark_pct` int NOT NULL,
	`state` enum('open','submitted','timed_out') NOT NULL DEFAULT 'open',
	`started_at` datetime(3) NOT NULL,
	`deadline_at` datetime(3),
	`submitted_at` datetime(3),
	`score_pct` decimal(5,2),
	`passed` boolean,
	CONSTRAINT `check_attempts_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `check_questions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`check_version_id` bigint unsigned NOT NULL,
	`position` int NOT NULL,
	`kind` enum('single','multiple','true_false','numeric','calculated') NOT NULL,
	`prompt` text NOT NULL,
	`choices` json,
	`answer_key` json,
	`calc` json,
	`explanation` text,
	`points` int NOT NULL DEFAULT 1,
	CONSTRAINT `check_questions_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `check_versions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`check_id` bigint unsigned NOT NULL,
	`version` int NOT NULL,
	`state` enum('draft','in_review','approved','retired') NOT NULL DEFAULT 'draft',
	`revision_id` bigint unsigned,
	`questions_per_attempt` int NOT NULL,
	`time_limit_min` int,
	`attempts_before_cooldown` int NOT NULL DEFAULT 1,
	`cooldown_min` int NOT NULL DEFAULT 60,
	`author_id` bigint unsigned NOT NULL,
	`submitted_at` datetime(3),
	`approved_at` datetime(3),
	`approved_by` bigint unsigned,
	`content_hash` char(64),
	`created_at` datetime(3) NOT NULL,
	`updated_at` datetime(3) NOT NULL,
	CONSTRAINT `check_versions_id` PRIMARY KEY(`id`),
	CONSTRAINT `check_versions_check_version` UNIQUE(`check_id`,`version`)
);
--> statement-breakpoint
CREATE TABLE `checklist_items` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`checklist_id` bigint unsigned NOT NULL,
	`position` int NOT NULL,
	`text` varchar(500) NOT NULL,
	CONSTRAINT `checklist_items_id` PRIMARY KEY(`id`),
	CONSTRAINT `checklist_items_position` UNIQUE(`checklist_id`,`position`)
);
--> statement-breakpoint
CREATE TABLE `checklists` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`process_id` bigint unsigned NOT NULL,
	`revision_id` bigint unsigned NOT NULL,
	`title` varchar(300) NOT NULL,
	`created_by` bigint unsigned NOT NULL,
	`created_at` datetime(3) NOT NULL,
	`retired_at` datetime(3),
	CONSTRAINT `checklists_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `knowledge_checks` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`code` varchar(32) NOT NULL,
	`title` varchar(300) NOT NULL,
	`process_id` bigint unsigned NOT NULL,
	`owner_id` bigint unsigned NOT NULL,
	`created_at` datetime(3) NOT NULL,
	CONSTRAINT `knowledge_checks_id` PRIMARY KEY(`id`),
	CONSTRAINT `knowledge_checks_code_unique` UNIQUE(`code`)
);
--> statement-breakpoint
CREATE TABLE `rule_instructions` (
	`rule_id` bigint unsigned NOT NULL,
	`instruction_id` bigint unsigned NOT NULL,
	CONSTRAINT `rule_instructions_rule_id_instruction_id_pk` PRIMARY KEY(`rule_id`,`instruction_id`)
);
--> statement-breakpoint
CREATE TABLE `signoff_items` (
	`signoff_id` bigint unsigned NOT NULL,
	`item_id` bigint unsigned NOT NULL,
	`result` enum('pass','fail'),
	`comment` varchar(1000),
	`photo_key` varchar(200),
	`photo_type` varchar(100),
	CONSTRAINT `signoff_items_signoff_id_item_id_pk` PRIMARY KEY(`signoff_id`,`item_id`)
);
--> statement-breakpoint
CREATE TABLE `signoffs` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`person_id` bigint unsigned NOT NULL,
	`checklist_id` bigint unsigned NOT NULL,
	`process_id` bigint unsigned NOT NULL,
	`revision_id` bigint unsigned NOT NULL,
	`station_id` bigint unsigned,
	`trainer_id` bigint unsigned NOT NULL,
	`state` enum('draft','trainer_signed','countersigned','failed') NOT NULL DEFAULT 'draft',
	`passed` boolean,
	`content_hash` char(64),
	`created_at` datetime(3) NOT NULL,
	`trainer_signed_at` datetime(3),
	`operator_signed_at` datetime(3),
	CONSTRAINT `signoffs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `certificate_basis` (
	`certificate_id` bigint unsigned NOT NULL,
	`kind` enum('acknowledgement','attempt','signoff') NOT NULL,
	`ref_id` bigint unsigned NOT NULL,
	`revision_id` bigint unsigned,
	CONSTRAINT `certificate_basis_certificate_id_kind_ref_id_pk` PRIMARY KEY(`certificate_id`,`kind`,`ref_id`)
);
--> statement-breakpoint
CREATE TABLE `certificates` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`number` varchar(40) NOT NULL,
	`person_id` bigint unsigned NOT NULL,
	`process_id` bigint unsigned NOT NULL,
	`rule_id` bigint unsigned NOT NULL,
	`state` enum('active','retraining_due','expired','suspended','withdrawn','superseded') NOT NULL DEFAULT 'active',
	`issued_at` datetime(3) NOT NULL,
	`expires_at` datetime(3) NOT NULL,
	`issued_by` bigint unsigned,
	`signer_name` varchar(200) NOT NULL,
	`signer_role` varchar(100) NOT NULL,
	`verify_token_hash` char(64) NOT NULL,
	`pdf_key` varchar(200),
	`previous_id` bigint unsigned,
	`retraining_revision_id` bigint unsigned,
	`grace_until` datetime(3),
	`state_reason` text,
	`state_changed_at` datetime(3),
	`state_changed_by` bigint unsigned,
	CONSTRAINT `certificates_id` PRIMARY KEY(`id`),
	CONSTRAINT `certificates_number_unique` UNIQUE(`number`),
	CONSTRAINT `certificates_verifyTokenHash_unique` UNIQUE(`verify_token_hash`)
);
--> statement-breakpoint
CREATE TABLE `job_leases` (
	`name` varchar(64) NOT NULL,
	`holder` varchar(100),
	`lease_until` datetime(3),
	`last_run_at` datetime(3),
	`last_result` text,
	CONSTRAINT `job_leases_name` PRIMARY KEY(`name`)
);
--> statement-breakpoint
CREATE TABLE `verify_hits` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`address` varchar(64) NOT NULL,
	`at` datetime(3) NOT NULL,
	CONSTRAINT `verify_hits_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `signatures` MODIFY COLUMN `meaning` enum('reviewed','approved','observed','countersigned') NOT NULL;--> statement-breakpoint
ALTER TABLE `acknowledgements` ADD CONSTRAINT `acknowledgements_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `acknowledgements` ADD CONSTRAINT `acknowledgements_revision_id_revisions_id_fk` FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `assignments` ADD CONSTRAINT `assignments_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `assignments` ADD CONSTRAINT `assignments_process_id_processes_id_fk` FOREIGN KEY (`process_id`) REFERENCES `processes`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `assignments` ADD CONSTRAINT `assignments_line_id_lines_id_fk` FOREIGN KEY (`line_id`) REFERENCES `lines`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `assignments` ADD CONSTRAINT `assignments_station_id_stations_id_fk` FOREIGN KEY (`station_id`) REFERENCES `stations`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `assignments` ADD CONSTRAINT `assignments_assigned_by_people_id_fk` FOREIGN KEY (`assigned_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `attempt_items` ADD CONSTRAINT `attempt_items_attempt_id_check_attempts_id_fk` FOREIGN KEY (`attempt_id`) REFERENCES `check_attempts`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `attempt_items` ADD CONSTRAINT `attempt_items_question_id_check_questions_id_fk` FOREIGN KEY (`question_id`) REFERENCES `check_questions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `certification_rules` ADD CONSTRAINT `certification_rules_process_id_processes_id_fk` FOREIGN KEY (`process_id`) REFERENCES `processes`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `certification_rules` ADD CONSTRAINT `certification_rules_check_id_knowledge_checks_id_fk` FOREIGN KEY (`check_id`) REFERENCES `knowledge_checks`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `certification_rules` ADD CONSTRAINT `certification_rules_checklist_id_checklists_id_fk` FOREIGN KEY (`checklist_id`) REFERENCES `checklists`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `certification_rules` ADD CONSTRAINT `certification_rules_created_by_people_id_fk` FOREIGN KEY (`created_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `check_attempts` ADD CONSTRAINT `check_attempts_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `check_attempts` ADD CONSTRAINT `check_attempts_check_version_id_check_versions_id_fk` FOREIGN KEY (`check_version_id`) REFERENCES `check_versions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `check_attempts` ADD CONSTRAINT `check_attempts_process_id_processes_id_fk` FOREIGN KEY (`process_id`) REFERENCES `processes`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `check_questions` ADD CONSTRAINT `check_questions_check_version_id_check_versions_id_fk` FOREIGN KEY (`check_version_id`) REFERENCES `check_versions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `check_versions` ADD CONSTRAINT `check_versions_check_id_knowledge_checks_id_fk` FOREIGN KEY (`check_id`) REFERENCES `knowledge_checks`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `check_versions` ADD CONSTRAINT `check_versions_revision_id_revisions_id_fk` FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `check_versions` ADD CONSTRAINT `check_versions_author_id_people_id_fk` FOREIGN KEY (`author_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `check_versions` ADD CONSTRAINT `check_versions_approved_by_people_id_fk` FOREIGN KEY (`approved_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `checklist_items` ADD CONSTRAINT `checklist_items_checklist_id_checklists_id_fk` FOREIGN KEY (`checklist_id`) REFERENCES `checklists`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `checklists` ADD CONSTRAINT `checklists_process_id_processes_id_fk` FOREIGN KEY (`process_id`) REFERENCES `processes`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `checklists` ADD CONSTRAINT `checklists_revision_id_revisions_id_fk` FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `checklists` ADD CONSTRAINT `checklists_created_by_people_id_fk` FOREIGN KEY (`created_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `knowledge_checks` ADD CONSTRAINT `knowledge_checks_process_id_processes_id_fk` FOREIGN KEY (`process_id`) REFERENCES `processes`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `knowledge_checks` ADD CONSTRAINT `knowledge_checks_owner_id_people_id_fk` FOREIGN KEY (`owner_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `rule_instructions` ADD CONSTRAINT `rule_instructions_rule_id_certification_rules_id_fk` FOREIGN KEY (`rule_id`) REFERENCES `certification_rules`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `rule_instructions` ADD CONSTRAINT `rule_instructions_instruction_id_instructions_id_fk` FOREIGN KEY (`instruction_id`) REFERENCES `instructions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoff_items` ADD CONSTRAINT `signoff_items_signoff_id_signoffs_id_fk` FOREIGN KEY (`signoff_id`) REFERENCES `signoffs`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoff_items` ADD CONSTRAINT `signoff_items_item_id_checklist_items_id_fk` FOREIGN KEY (`item_id`) REFERENCES `checklist_items`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_checklist_id_checklists_id_fk` FOREIGN KEY (`checklist_id`) REFERENCES `checklists`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_process_id_processes_id_fk` FOREIGN KEY (`process_id`) REFERENCES `processes`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_revision_id_revisions_id_fk` FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_station_id_stations_id_fk` FOREIGN KEY (`station_id`) REFERENCES `stations`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `signoffs` ADD CONSTRAINT `signoffs_trainer_id_people_id_fk` FOREIGN KEY (`trainer_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `certificate_basis` ADD CONSTRAINT `certificate_basis_certificate_id_certificates_id_fk` FOREIGN KEY (`certificate_id`) REFERENCES `certificates`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `certificate_basis` ADD CONSTRAINT `certificate_basis_revision_id_revisions_id_fk` FOREIGN KEY (`revision_id`) REFERENCES `revisions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `certificates` ADD CONSTRAINT `certificates_person_id_people_id_fk` FOREIGN KEY (`person_id`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `certificates` ADD CONSTRAINT `certificates_process_id_processes_id_fk` FOREIGN KEY (`process_id`) REFERENCES `processes`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `certificates` ADD CONSTRAINT `certificates_rule_id_certification_rules_id_fk` FOREIGN KEY (`rule_id`) REFERENCES `certification_rules`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `certificates` ADD CONSTRAINT `certificates_issued_by_people_id_fk` FOREIGN KEY (`issued_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `certificates` ADD CONSTRAINT `certificates_retraining_revision_id_revisions_id_fk` FOREIGN KEY (`retraining_revision_id`) REFERENCES `revisions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `certificates` ADD CONSTRAINT `certificates_state_changed_by_people_id_fk` FOREIGN KEY (`state_changed_by`) REFERENCES `people`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `assignments_person` ON `assignments` (`person_id`,`process_id`);--> statement-breakpoint
CREATE INDEX `check_attempts_person` ON `check_attempts` (`person_id`,`check_version_id`,`started_at`);--> statement-breakpoint
CREATE INDEX `check_questions_version` ON `check_questions` (`check_version_id`,`position`);--> statement-breakpoint
CREATE INDEX `signoffs_person` ON `signoffs` (`person_id`,`process_id`);--> statement-breakpoint
CREATE INDEX `certificate_basis_revision` ON `certificate_basis` (`revision_id`);--> statement-breakpoint
CREATE INDEX `certificates_person_process` ON `certificates` (`person_id`,`process_id`);--> statement-breakpoint
CREATE INDEX `certificates_state_expiry` ON `certificates` (`state`,`expires_at`);--> statement-breakpoint
CREATE INDEX `verify_hits_address` ON `verify_hits` (`address`,`at`);