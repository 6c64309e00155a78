CREATE TABLE `release_events` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`release_id` integer NOT NULL,
	`action` text NOT NULL,
	`from_state` text,
	`to_state` text,
	`version` integer,
	`actor_id` integer,
	`comment` text,
	`publish_at` integer,
	`detail_json` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`release_id`) REFERENCES `releases`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `release_events_release_idx` ON `release_events` (`release_id`,`id`);--> statement-breakpoint
CREATE TABLE `release_versions` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`release_id` integer NOT NULL,
	`version` integer NOT NULL,
	`content_json` text NOT NULL,
	`sha256` text NOT NULL,
	`reviewer_id` integer,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`release_id`) REFERENCES `releases`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`reviewer_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `release_versions_release_version_idx` ON `release_versions` (`release_id`,`version`);--> statement-breakpoint
CREATE TABLE `releases` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`number` text NOT NULL,
	`bulletin_id` integer NOT NULL,
	`bulletin_version` integer NOT NULL,
	`bulletin_sha256` text NOT NULL,
	`object_id` integer NOT NULL,
	`title` text NOT NULL,
	`summary` text DEFAULT '' NOT NULL,
	`state` text DEFAULT 'draft' NOT NULL,
	`document_json` text NOT NULL,
	`figures_json` text NOT NULL,
	`revision` integer DEFAULT 1 NOT NULL,
	`draft_version` integer DEFAULT 1 NOT NULL,
	`latest_version` integer,
	`author_id` integer,
	`updated_by_id` integer,
	`publish_at` integer,
	`publish_time_zone` text,
	`published_at` integer,
	`published_version` integer,
	`late_by_ms` integer,
	`published_on_start` integer DEFAULT false NOT NULL,
	`slug` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`bulletin_id`) REFERENCES `bulletins`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`object_id`) REFERENCES `tracked_objects`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`updated_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `releases_number_unique` ON `releases` (`number`);--> statement-breakpoint
CREATE UNIQUE INDEX `releases_slug_unique` ON `releases` (`slug`);--> statement-breakpoint
CREATE INDEX `releases_state_publish_idx` ON `releases` (`state`,`publish_at`);--> statement-breakpoint
CREATE INDEX `releases_published_idx` ON `releases` (`published_at`);