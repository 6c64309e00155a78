CREATE TABLE `orbit_solutions` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`object_id` integer NOT NULL,
	`version` integer NOT NULL,
	`source_kind` text NOT NULL,
	`file_name` text,
	`raw_text` text NOT NULL,
	`input_sha256` text NOT NULL,
	`epoch_tdb_days` real NOT NULL,
	`observation_arc_days` real,
	`observation_count` integer,
	`fit_rms_arcsec` real,
	`force_model` text NOT NULL,
	`non_grav_terms` text DEFAULT '' NOT NULL,
	`remark` text,
	`orbit_json` text NOT NULL,
	`classification_json` text NOT NULL,
	`created_by_id` integer,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`object_id`) REFERENCES `tracked_objects`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`created_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `orbit_solutions_object_version_idx` ON `orbit_solutions` (`object_id`,`version`);--> statement-breakpoint
CREATE TABLE `tracked_objects` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`designation` text NOT NULL,
	`name` text,
	`kind` text NOT NULL,
	`notes` text DEFAULT '' NOT NULL,
	`watch` integer DEFAULT false NOT NULL,
	`created_by_id` integer,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	`solution_count` integer DEFAULT 0 NOT NULL,
	`latest_solution_version` integer,
	`latest_solution_at` integer,
	`next_close_approach_at` integer,
	`max_impact_probability` real,
	`cumulative_palermo` real,
	`max_torino` integer,
	`last_run_at` integer,
	FOREIGN KEY (`created_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `tracked_objects_designation_unique` ON `tracked_objects` (`designation`);--> statement-breakpoint
CREATE INDEX `tracked_objects_name_idx` ON `tracked_objects` (`name`);--> statement-breakpoint
CREATE INDEX `tracked_objects_kind_idx` ON `tracked_objects` (`kind`);--> statement-breakpoint
CREATE INDEX `tracked_objects_watch_idx` ON `tracked_objects` (`watch`);--> statement-breakpoint
CREATE INDEX `tracked_objects_created_at_idx` ON `tracked_objects` (`created_at`);--> statement-breakpoint
CREATE INDEX `tracked_objects_latest_solution_at_idx` ON `tracked_objects` (`latest_solution_at`);--> statement-breakpoint
CREATE INDEX `tracked_objects_next_close_approach_at_idx` ON `tracked_objects` (`next_close_approach_at`);--> statement-breakpoint
CREATE INDEX `tracked_objects_max_impact_probability_idx` ON `tracked_objects` (`max_impact_probability`);--> statement-breakpoint
CREATE INDEX `tracked_objects_cumulative_palermo_idx` ON `tracked_objects` (`cumulative_palermo`);--> statement-breakpoint
CREATE INDEX `tracked_objects_max_torino_idx` ON `tracked_objects` (`max_torino`);--> statement-breakpoint
CREATE INDEX `tracked_objects_last_run_at_idx` ON `tracked_objects` (`last_run_at`);