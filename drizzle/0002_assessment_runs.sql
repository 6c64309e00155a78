CREATE TABLE `assessment_runs` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`object_id` integer NOT NULL,
	`solution_id` integer NOT NULL,
	`solution_version` integer NOT NULL,
	`input_sha256` text NOT NULL,
	`options_json` text NOT NULL,
	`status` text DEFAULT 'queued' NOT NULL,
	`progress_stage` text,
	`progress_done` real DEFAULT 0 NOT NULL,
	`progress_total` real DEFAULT 0 NOT NULL,
	`rate_clones_per_s` real,
	`eta_s` real,
	`error` text,
	`attempts` integer DEFAULT 0 NOT NULL,
	`lease_owner` text,
	`lease_expires_at` integer,
	`created_by_id` integer,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	`started_at` integer,
	`finished_at` integer,
	`provenance_json` text,
	`result_json` text,
	FOREIGN KEY (`object_id`) REFERENCES `tracked_objects`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`solution_id`) REFERENCES `orbit_solutions`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`created_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `assessment_runs_status_idx` ON `assessment_runs` (`status`,`id`);--> statement-breakpoint
CREATE INDEX `assessment_runs_object_idx` ON `assessment_runs` (`object_id`,`id`);--> statement-breakpoint
CREATE INDEX `assessment_runs_solution_idx` ON `assessment_runs` (`solution_id`);