CREATE TABLE `audit_log` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`lab_id` text,
	`user_id` text,
	`action` text NOT NULL,
	`target` text DEFAULT '' NOT NULL,
	`details` text,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `audit_lab_idx` ON `audit_log` (`lab_id`,`created_at`);--> statement-breakpoint
CREATE TABLE `batches` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`code` text NOT NULL,
	`synthesis_date` text,
	`method` text DEFAULT '' NOT NULL,
	`notes` text DEFAULT '' NOT NULL,
	`created_by` text,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `batches_lab_code_idx` ON `batches` (`lab_id`,`code`);--> statement-breakpoint
CREATE TABLE `bundles` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`name` text NOT NULL,
	`file_sha256` text NOT NULL,
	`size_bytes` integer NOT NULL,
	`payload_manifest_sha256` text NOT NULL,
	`selection` text NOT NULL,
	`contents` text NOT NULL,
	`created_by` text,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`file_sha256`) REFERENCES `stored_files`(`sha256`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `bundles_lab_idx` ON `bundles` (`lab_id`);--> statement-breakpoint
CREATE TABLE `comparisons` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`name` text NOT NULL,
	`selection` text NOT NULL,
	`parameter` text NOT NULL,
	`group_by` text DEFAULT 'batch' NOT NULL,
	`created_by` text,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE TABLE `fit_parameters` (
	`fit_id` text NOT NULL,
	`name` text NOT NULL,
	`value` real NOT NULL,
	`stderr` real,
	`stderr_unscaled` real,
	`stderr_mass` real,
	`unit` text NOT NULL,
	`fixed` integer DEFAULT false NOT NULL,
	PRIMARY KEY(`fit_id`, `name`),
	FOREIGN KEY (`fit_id`) REFERENCES `fits`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `fit_parameters_name_idx` ON `fit_parameters` (`name`);--> statement-breakpoint
CREATE TABLE `fits` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`run_id` text NOT NULL,
	`state` text DEFAULT 'draft' NOT NULL,
	`model` text NOT NULL,
	`window_min_k` real NOT NULL,
	`window_max_k` real NOT NULL,
	`points_used` integer NOT NULL,
	`masked_excluded` integer DEFAULT 0 NOT NULL,
	`converged` integer NOT NULL,
	`stop_reason` text NOT NULL,
	`chi_square` real NOT NULL,
	`reduced_chi_square` real NOT NULL,
	`dof` integer NOT NULL,
	`aic` real NOT NULL,
	`bic` real NOT NULL,
	`covariance` text NOT NULL,
	`correlation` text NOT NULL,
	`result` text NOT NULL,
	`input_sha256` text NOT NULL,
	`software_version` text NOT NULL,
	`notes` text DEFAULT '' NOT NULL,
	`created_by` text,
	`created_at` integer NOT NULL,
	`approved_by` text,
	`approved_at` integer,
	`superseded_by` text,
	`superseded_at` integer,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`approved_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `fits_run_idx` ON `fits` (`run_id`);--> statement-breakpoint
CREATE INDEX `fits_lab_state_idx` ON `fits` (`lab_id`,`state`);--> statement-breakpoint
CREATE TABLE `import_presets` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`name` text NOT NULL,
	`mapping` text NOT NULL,
	`created_by` text,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `import_presets_lab_name_idx` ON `import_presets` (`lab_id`,`name`);--> statement-breakpoint
CREATE TABLE `invitations` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`email` text NOT NULL,
	`role` text NOT NULL,
	`token_hash` text NOT NULL,
	`invited_by` text,
	`created_at` integer NOT NULL,
	`expires_at` integer NOT NULL,
	`accepted_at` integer,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`invited_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `invitations_token_hash_unique` ON `invitations` (`token_hash`);--> statement-breakpoint
CREATE INDEX `invitations_lab_idx` ON `invitations` (`lab_id`);--> statement-breakpoint
CREATE TABLE `labs` (
	`id` text PRIMARY KEY NOT NULL,
	`name` text NOT NULL,
	`organisation` text DEFAULT '' NOT NULL,
	`contact_email` text DEFAULT '' NOT NULL,
	`created_at` integer NOT NULL
);
--> statement-breakpoint
CREATE TABLE `mail_messages` (
	`id` text PRIMARY KEY NOT NULL,
	`from_address` text NOT NULL,
	`to_address` text NOT NULL,
	`subject` text NOT NULL,
	`text_body` text NOT NULL,
	`raw` text NOT NULL,
	`received_at` integer NOT NULL
);
--> statement-breakpoint
CREATE TABLE `memberships` (
	`lab_id` text NOT NULL,
	`user_id` text NOT NULL,
	`role` text NOT NULL,
	`created_at` integer NOT NULL,
	PRIMARY KEY(`lab_id`, `user_id`),
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `memberships_user_idx` ON `memberships` (`user_id`);--> statement-breakpoint
CREATE TABLE `password_resets` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`token_hash` text NOT NULL,
	`created_at` integer NOT NULL,
	`expires_at` integer NOT NULL,
	`used_at` integer,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `password_resets_token_hash_unique` ON `password_resets` (`token_hash`);--> statement-breakpoint
CREATE TABLE `run_points` (
	`run_id` text NOT NULL,
	`idx` integer NOT NULL,
	`temperature_k` real NOT NULL,
	`cp` real NOT NULL,
	`cp_sigma` real,
	`field_t` real,
	`rows_averaged` integer DEFAULT 1 NOT NULL,
	`source_line` integer NOT NULL,
	`masked` integer DEFAULT false NOT NULL,
	PRIMARY KEY(`run_id`, `idx`),
	FOREIGN KEY (`run_id`) REFERENCES `runs`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `runs` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`sample_id` text,
	`kind` text DEFAULT 'sample' NOT NULL,
	`platform` text DEFAULT '' NOT NULL,
	`label` text DEFAULT '' NOT NULL,
	`file_sha256` text NOT NULL,
	`file_name` text NOT NULL,
	`mapping` text NOT NULL,
	`field_t` real,
	`addenda_run_id` text,
	`mass_mg` real,
	`molar_mass_g_per_mol` real,
	`atoms_per_formula_unit` real,
	`point_count` integer NOT NULL,
	`t_min_k` real NOT NULL,
	`t_max_k` real NOT NULL,
	`warnings` text NOT NULL,
	`notes` text DEFAULT '' NOT NULL,
	`created_by` text,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`sample_id`) REFERENCES `samples`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`file_sha256`) REFERENCES `stored_files`(`sha256`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `runs_lab_idx` ON `runs` (`lab_id`);--> statement-breakpoint
CREATE INDEX `runs_sample_idx` ON `runs` (`sample_id`);--> statement-breakpoint
CREATE INDEX `runs_file_idx` ON `runs` (`file_sha256`);--> statement-breakpoint
CREATE TABLE `samples` (
	`id` text PRIMARY KEY NOT NULL,
	`lab_id` text NOT NULL,
	`batch_id` text,
	`label` text NOT NULL,
	`formula` text NOT NULL,
	`molar_mass_g_per_mol` real NOT NULL,
	`molar_mass_override_reason` text,
	`atoms_per_formula_unit` real NOT NULL,
	`atoms_override_reason` text,
	`mass_mg` real NOT NULL,
	`mass_sigma_mg` real DEFAULT 0 NOT NULL,
	`composition_x` real,
	`composition_name` text,
	`notes` text DEFAULT '' NOT NULL,
	`created_by` text,
	`created_at` integer NOT NULL,
	`updated_at` integer NOT NULL,
	FOREIGN KEY (`lab_id`) REFERENCES `labs`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`batch_id`) REFERENCES `batches`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `samples_lab_idx` ON `samples` (`lab_id`);--> statement-breakpoint
CREATE INDEX `samples_batch_idx` ON `samples` (`batch_id`);--> statement-breakpoint
CREATE TABLE `sessions` (
	`id` text PRIMARY KEY NOT NULL,
	`user_id` text NOT NULL,
	`expires_at` integer NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE TABLE `share_links` (
	`id` text PRIMARY KEY NOT NULL,
	`bundle_id` text NOT NULL,
	`token_hash` text NOT NULL,
	`expires_at` integer NOT NULL,
	`max_downloads` integer,
	`download_count` integer DEFAULT 0 NOT NULL,
	`email_to` text,
	`revoked_at` integer,
	`created_by` text,
	`created_at` integer NOT NULL,
	FOREIGN KEY (`bundle_id`) REFERENCES `bundles`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `share_links_token_hash_unique` ON `share_links` (`token_hash`);--> statement-breakpoint
CREATE TABLE `stored_files` (
	`sha256` text PRIMARY KEY NOT NULL,
	`size_bytes` integer NOT NULL,
	`created_at` integer NOT NULL
);
--> statement-breakpoint
CREATE TABLE `users` (
	`id` text PRIMARY KEY NOT NULL,
	`email` text NOT NULL,
	`display_name` text NOT NULL,
	`password_hash` text NOT NULL,
	`is_site_admin` integer DEFAULT false NOT NULL,
	`created_at` integer NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `users_email_unique` ON `users` (`email`);