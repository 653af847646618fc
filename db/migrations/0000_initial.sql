CREATE TABLE `api_tokens` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`name` varchar(100) NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`token_sha256` char(64) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`last_used_at` datetime(3),
	`expires_at` datetime(3),
	`revoked_at` datetime(3),
	CONSTRAINT `api_tokens_id` PRIMARY KEY(`id`),
	CONSTRAINT `api_tokens_token_sha256_unique` UNIQUE(`token_sha256`)
);
--> statement-breakpoint
CREATE TABLE `artwork_revisions` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`job_id` bigint unsigned NOT NULL,
	`revision` int unsigned NOT NULL,
	`source_key` varchar(512) NOT NULL,
	`source_sha256` char(64) NOT NULL,
	`original_filename` varchar(255) NOT NULL DEFAULT '',
	`byte_size` bigint unsigned NOT NULL DEFAULT 0,
	`page_count` smallint unsigned NOT NULL DEFAULT 1,
	`page_width_um` int unsigned NOT NULL,
	`page_height_um` int unsigned NOT NULL,
	`page_box` varchar(16) NOT NULL DEFAULT 'TrimBox',
	`ups_rows` smallint unsigned NOT NULL DEFAULT 1,
	`ups_columns` smallint unsigned NOT NULL DEFAULT 1,
	`ups_area_x_um` int unsigned,
	`ups_area_y_um` int unsigned,
	`ups_area_w_um` int unsigned,
	`ups_area_h_um` int unsigned,
	`status` enum('draft','approved','superseded') NOT NULL DEFAULT 'draft',
	`uploaded_by` bigint unsigned,
	`approved_by` bigint unsigned,
	`approved_at` datetime(3),
	`raster_status` enum('none','pending','ready','failed') NOT NULL DEFAULT 'none',
	`raster_dpi` smallint unsigned,
	`raster_keys` json,
	`raster_error` text,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `artwork_revisions_id` PRIMARY KEY(`id`),
	CONSTRAINT `artwork_revisions_job_revision_uq` UNIQUE(`job_id`,`revision`)
);
--> statement-breakpoint
CREATE TABLE `audit_events` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`actor_id` bigint unsigned,
	`action` varchar(64) NOT NULL,
	`subject_type` varchar(32) NOT NULL,
	`subject_id` varchar(64) NOT NULL,
	`at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`details` json,
	CONSTRAINT `audit_events_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `customers` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`name` varchar(200) NOT NULL,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `customers_id` PRIMARY KEY(`id`),
	CONSTRAINT `customers_name_unique` UNIQUE(`name`)
);
--> statement-breakpoint
CREATE TABLE `findings` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`inspection_id` bigint unsigned NOT NULL,
	`x_um` int NOT NULL,
	`y_um` int NOT NULL,
	`w_um` int unsigned NOT NULL,
	`h_um` int unsigned NOT NULL,
	`area_um2` bigint unsigned NOT NULL,
	`delta_e00_mean` double NOT NULL,
	`delta_e00_max` double NOT NULL,
	`kind` enum('extra_ink','missing_ink','colour_shift') NOT NULL,
	`up_index` smallint unsigned,
	`crop_artwork_key` varchar(512),
	`crop_scan_key` varchar(512),
	`crop_difference_key` varchar(512),
	`decision` enum('pending','accepted','rejected') NOT NULL DEFAULT 'pending',
	`decided_by` bigint unsigned,
	`decided_at` datetime(3),
	`comment` text,
	`version` int unsigned NOT NULL DEFAULT 0,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `findings_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `inspections` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`scan_id` bigint unsigned NOT NULL,
	`artwork_revision_id` bigint unsigned NOT NULL,
	`tolerance_profile_id` bigint unsigned NOT NULL,
	`status` enum('queued','running','done','failed') NOT NULL DEFAULT 'queued',
	`stage` varchar(32),
	`progress_percent` tinyint unsigned NOT NULL DEFAULT 0,
	`error_code` varchar(64),
	`error_message` text,
	`rotation_deg` double,
	`scale` double,
	`tx_um` int,
	`ty_um` int,
	`residual_um` int unsigned,
	`correlation` double,
	`covered_x_um` int,
	`covered_y_um` int,
	`covered_w_um` int unsigned,
	`covered_h_um` int unsigned,
	`drift_delta_e00` double,
	`verdict` enum('pending','passed','failed') NOT NULL DEFAULT 'pending',
	`signed_by` bigint unsigned,
	`signed_at` datetime(3),
	`signature` text,
	`timings_ms` json,
	`attempts` smallint unsigned NOT NULL DEFAULT 0,
	`version` int unsigned NOT NULL DEFAULT 0,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`started_at` datetime(3),
	`finished_at` datetime(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `inspections_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
CREATE TABLE `jobs` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`customer_id` bigint unsigned NOT NULL,
	`job_number` varchar(32) NOT NULL,
	`title` varchar(200) NOT NULL,
	`stock` varchar(200) NOT NULL DEFAULT '',
	`press` varchar(100) NOT NULL DEFAULT '',
	`status` enum('prepress','on_press','completed','cancelled') NOT NULL DEFAULT 'prepress',
	`artwork_dpi` smallint unsigned NOT NULL DEFAULT 300,
	`ups_rows` smallint unsigned NOT NULL DEFAULT 1,
	`ups_columns` smallint unsigned NOT NULL DEFAULT 1,
	`created_by` bigint unsigned,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `jobs_id` PRIMARY KEY(`id`),
	CONSTRAINT `jobs_job_number_unique` UNIQUE(`job_number`)
);
--> statement-breakpoint
CREATE TABLE `scans` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`job_id` bigint unsigned NOT NULL,
	`artwork_revision_id` bigint unsigned NOT NULL,
	`sheet_number` int unsigned,
	`object_key` varchar(512) NOT NULL,
	`sha256` char(64) NOT NULL,
	`dpi` smallint unsigned NOT NULL,
	`byte_size` bigint unsigned NOT NULL,
	`original_filename` varchar(255) NOT NULL DEFAULT '',
	`content_type` varchar(100) NOT NULL DEFAULT '',
	`uploaded_by` bigint unsigned,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `scans_id` PRIMARY KEY(`id`),
	CONSTRAINT `scans_job_sha256_uq` UNIQUE(`job_id`,`sha256`)
);
--> statement-breakpoint
CREATE TABLE `tolerance_profiles` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`name` varchar(64) NOT NULL,
	`label` varchar(200) NOT NULL,
	`min_defect_um` int unsigned NOT NULL,
	`delta_e00_threshold` double NOT NULL,
	`registration_tolerance_um` int unsigned NOT NULL,
	`excluded_areas_mm` json NOT NULL,
	`builtin` boolean NOT NULL DEFAULT false,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `tolerance_profiles_id` PRIMARY KEY(`id`),
	CONSTRAINT `tolerance_profiles_name_unique` UNIQUE(`name`)
);
--> statement-breakpoint
CREATE TABLE `user_invites` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`user_id` bigint unsigned NOT NULL,
	`token_sha256` char(64) NOT NULL,
	`created_by` bigint unsigned,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`expires_at` datetime(3) NOT NULL,
	`used_at` datetime(3),
	CONSTRAINT `user_invites_id` PRIMARY KEY(`id`),
	CONSTRAINT `user_invites_token_sha256_unique` UNIQUE(`token_sha256`)
);
--> statement-breakpoint
CREATE TABLE `users` (
	`id` bigint unsigned AUTO_INCREMENT NOT NULL,
	`email` varchar(254) NOT NULL,
	`name` varchar(200) NOT NULL,
	`password_hash` varchar(255),
	`role` enum('admin','prepress','qa','reviewer','customer') NOT NULL,
	`customer_id` bigint unsigned,
	`disabled` boolean NOT NULL DEFAULT false,
	`last_sign_in_at` datetime(3),
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`updated_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `users_id` PRIMARY KEY(`id`),
	CONSTRAINT `users_email_unique` UNIQUE(`email`)
);
--> statement-breakpoint
ALTER TABLE `api_tokens` ADD CONSTRAINT `api_tokens_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `artwork_revisions` ADD CONSTRAINT `artwork_revisions_job_id_jobs_id_fk` FOREIGN KEY (`job_id`) REFERENCES `jobs`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `artwork_revisions` ADD CONSTRAINT `artwork_revisions_uploaded_by_users_id_fk` FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `artwork_revisions` ADD CONSTRAINT `artwork_revisions_approved_by_users_id_fk` FOREIGN KEY (`approved_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `audit_events` ADD CONSTRAINT `audit_events_actor_id_users_id_fk` FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `findings` ADD CONSTRAINT `findings_inspection_id_inspections_id_fk` FOREIGN KEY (`inspection_id`) REFERENCES `inspections`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `findings` ADD CONSTRAINT `findings_decided_by_users_id_fk` FOREIGN KEY (`decided_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `inspections` ADD CONSTRAINT `inspections_scan_id_scans_id_fk` FOREIGN KEY (`scan_id`) REFERENCES `scans`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `inspections` ADD CONSTRAINT `inspections_artwork_revision_id_artwork_revisions_id_fk` FOREIGN KEY (`artwork_revision_id`) REFERENCES `artwork_revisions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `inspections` ADD CONSTRAINT `inspections_tolerance_profile_id_tolerance_profiles_id_fk` FOREIGN KEY (`tolerance_profile_id`) REFERENCES `tolerance_profiles`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `inspections` ADD CONSTRAINT `inspections_signed_by_users_id_fk` FOREIGN KEY (`signed_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `jobs` ADD CONSTRAINT `jobs_customer_id_customers_id_fk` FOREIGN KEY (`customer_id`) REFERENCES `customers`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `jobs` ADD CONSTRAINT `jobs_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `scans` ADD CONSTRAINT `scans_job_id_jobs_id_fk` FOREIGN KEY (`job_id`) REFERENCES `jobs`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `scans` ADD CONSTRAINT `scans_artwork_revision_id_artwork_revisions_id_fk` FOREIGN KEY (`artwork_revision_id`) REFERENCES `artwork_revisions`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `scans` ADD CONSTRAINT `scans_uploaded_by_users_id_fk` FOREIGN KEY (`uploaded_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `user_invites` ADD CONSTRAINT `user_invites_user_id_users_id_fk` FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `user_invites` ADD CONSTRAINT `user_invites_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `users` ADD CONSTRAINT `users_customer_id_customers_id_fk` FOREIGN KEY (`customer_id`) REFERENCES `customers`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `api_tokens_user_idx` ON `api_tokens` (`user_id`);--> statement-breakpoint
CREATE INDEX `audit_events_subject_idx` ON `audit_events` (`subject_type`,`subject_id`);--> statement-breakpoint
CREATE INDEX `audit_events_at_idx` ON `audit_events` (`at`);--> statement-breakpoint
CREATE INDEX `findings_inspection_idx` ON `findings` (`inspection_id`);--> statement-breakpoint
CREATE INDEX `inspections_scan_idx` ON `inspections` (`scan_id`);--> statement-breakpoint
CREATE INDEX `inspections_status_idx` ON `inspections` (`status`);--> statement-breakpoint
CREATE INDEX `jobs_customer_idx` ON `jobs` (`customer_id`);--> statement-breakpoint
CREATE INDEX `scans_artwork_revision_idx` ON `scans` (`artwork_revision_id`);--> statement-breakpoint
CREATE INDEX `user_invites_user_idx` ON `user_invites` (`user_id`);--> statement-breakpoint
CREATE INDEX `users_customer_idx` ON `users` (`customer_id`);