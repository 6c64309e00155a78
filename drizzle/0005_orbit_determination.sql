CREATE TABLE `astrometry_batches` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`object_id` integer NOT NULL,
	`file_name` text,
	`raw_text` text NOT NULL,
	`sha256` text NOT NULL,
	`observation_count` integer NOT NULL,
	`duplicates_skipped` integer DEFAULT 0 NOT NULL,
	`created_by_id` integer,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`object_id`) REFERENCES `tracked_objects`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`created_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `astrometry_batches_object_idx` ON `astrometry_batches` (`object_id`,`id`);--> statement-breakpoint
CREATE TABLE `observations` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`object_id` integer NOT NULL,
	`batch_id` integer NOT NULL,
	`line` integer NOT NULL,
	`perm_id` text,
	`prov_id` text,
	`trk_sub` text,
	`mode` text NOT NULL,
	`stn` text NOT NULL,
	`obs_time` text NOT NULL,
	`obs_time_tdb_days` real NOT NULL,
	`ra_deg` real NOT NULL,
	`dec_deg` real NOT NULL,
	`rms_ra_arcsec` real,
	`rms_dec_arcsec` real,
	`rms_corr` real,
	`ast_cat` text,
	`mag` real,
	`band` text,
	`remarks` text,
	`obs_key` text NOT NULL,
	`excluded` integer DEFAULT false NOT NULL,
	`excluded_reason` text,
	`excluded_by_id` integer,
	`excluded_at` integer,
	FOREIGN KEY (`object_id`) REFERENCES `tracked_objects`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`batch_id`) REFERENCES `astrometry_batches`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`stn`) REFERENCES `observatories`(`code`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`excluded_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `observations_object_key_idx` ON `observations` (`object_id`,`obs_key`);--> statement-breakpoint
CREATE INDEX `observations_object_time_idx` ON `observations` (`object_id`,`obs_time_tdb_days`);--> statement-breakpoint
CREATE INDEX `observations_batch_idx` ON `observations` (`batch_id`);--> statement-breakpoint
CREATE INDEX `observations_stn_idx` ON `observations` (`stn`);--> statement-breakpoint
CREATE TABLE `observatories` (
	`code` text PRIMARY KEY NOT NULL,
	`name` text NOT NULL,
	`longitude_deg` real NOT NULL,
	`rho_cos_phi` real,
	`rho_sin_phi` real,
	`geodetic_latitude_deg` real,
	`height_m` real,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	`updated_by_id` integer,
	FOREIGN KEY (`updated_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE TABLE `orbit_fits` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`object_id` integer NOT NULL,
	`settings_json` text NOT NULL,
	`observation_ids_json` text NOT NULL,
	`observations_sha256` text NOT NULL,
	`observation_count` integer NOT NULL,
	`observatories_json` text NOT NULL,
	`status` text DEFAULT 'queued' NOT NULL,
	`progress_stage` text,
	`progress_done` real DEFAULT 0 NOT NULL,
	`progress_total` real DEFAULT 0 NOT NULL,
	`error` text,
	`attempts` integer DEFAULT 0 NOT NULL,
	`lease_owner` text,
	`lease_expires_at` integer,
	`created_by_id` integer,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	`started_at` integer,
	`finished_at` integer,
	`result_json` text,
	`adopted_which` text,
	`adopted_solution_id` integer,
	`adopted_reason` text,
	`adopted_by_id` integer,
	`adopted_at` integer,
	FOREIGN KEY (`object_id`) REFERENCES `tracked_objects`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`created_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`adopted_solution_id`) REFERENCES `orbit_solutions`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`adopted_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `orbit_fits_status_idx` ON `orbit_fits` (`status`,`id`);--> statement-breakpoint
CREATE INDEX `orbit_fits_object_idx` ON `orbit_fits` (`object_id`,`id`);