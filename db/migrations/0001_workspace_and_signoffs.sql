CREATE TABLE `sheet_signoffs` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`inspection_id` bigint unsigned NOT NULL,
	`signed_by` bigint unsigned NOT NULL,
	`signer_name` varchar(200) NOT NULL,
	`signer_role` varchar(32) NOT NULL,
	`meaning` enum('reviewed','approved_for_release','rejected') NOT NULL,
	`verdict` enum('passed','failed') NOT NULL,
	`record_sha256` char(64) NOT NULL,
	`signed_at` datetime(3) NOT NULL,
	`reopened_by` bigint unsigned,
	`reopened_at` datetime(3),
	`reopen_reason` text,
	CONSTRAINT `sheet_signoffs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `findings` MODIFY COLUMN `kind` enum('extra_ink','missing_ink','colour_shift','changed_text','streak') NOT NULL;--> statement-breakpoint
ALTER TABLE `artwork_revisions` ADD `excluded_areas` json DEFAULT ('[]') NOT NULL;--> statement-breakpoint
ALTER TABLE `artwork_revisions` ADD `superseded_at` datetime(3);--> statement-breakpoint
ALTER TABLE `artwork_revisions` ADD `prepared_key` varchar(512);--> statement-breakpoint
ALTER TABLE `customers` ADD `contact_emails` json DEFAULT ('[]') NOT NULL;--> statement-breakpoint
ALTER TABLE `findings` ADD `decision_reason` enum('no_defect','within_tolerance','defect');--> statement-breakpoint
ALTER TABLE `findings` ADD `recurrence` enum('isolated','repeating','every_up');--> statement-breakpoint
ALTER TABLE `findings` ADD `prior_finding_id` bigint unsigned;--> statement-breakpoint
ALTER TABLE `inspections` ADD `tiles_status` enum('none','pending','ready','failed') DEFAULT 'none' NOT NULL;--> statement-breakpoint
ALTER TABLE `inspections` ADD `tiles_prefix` varchar(512);--> statement-breakpoint
ALTER TABLE `jobs` ADD `board_thickness_um` int unsigned;--> statement-breakpoint
ALTER TABLE `jobs` ADD `run_length_sheets` int unsigned;--> statement-breakpoint
ALTER TABLE `jobs` ADD `tolerance_profile_id` bigint unsigned;--> statement-breakpoint
ALTER TABLE `sheet_signoffs` ADD CONSTRAINT `sheet_signoffs_inspection_id_inspections_id_fk` FOREIGN KEY (`inspection_id`) REFERENCES `inspections`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `sheet_signoffs` ADD CONSTRAINT `sheet_signoffs_signed_by_users_id_fk` FOREIGN KEY (`signed_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `sheet_signoffs` ADD CONSTRAINT `sheet_signoffs_reopened_by_users_id_fk` FOREIGN KEY (`reopened_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `sheet_signoffs_inspection_idx` ON `sheet_signoffs` (`inspection_id`);--> statement-breakpoint
ALTER TABLE `jobs` ADD CONSTRAINT `jobs_tolerance_profile_id_tolerance_profiles_id_fk` FOREIGN KEY (`tolerance_profile_id`) REFERENCES `tolerance_profiles`(`id`) ON DELETE no action ON UPDATE no action;