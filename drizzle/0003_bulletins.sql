CREATE TABLE `bulletin_events` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`bulletin_id` integer NOT NULL,
	`action` text NOT NULL,
	`from_state` text,
	`to_state` text,
	`version` integer,
	`actor_id` integer,
	`comment` text,
	`detail_json` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`bulletin_id`) REFERENCES `bulletins`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`actor_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `bulletin_events_bulletin_idx` ON `bulletin_events` (`bulletin_id`,`id`);--> statement-breakpoint
CREATE TABLE `bulletin_versions` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`bulletin_id` integer NOT NULL,
	`version` integer NOT NULL,
	`status` text DEFAULT 'approved' NOT NULL,
	`title` text NOT NULL,
	`content_json` text NOT NULL,
	`sha256` text NOT NULL,
	`author_id` integer,
	`reviewer_id` integer,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`bulletin_id`) REFERENCES `bulletins`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`reviewer_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `bulletin_versions_bulletin_version_idx` ON `bulletin_versions` (`bulletin_id`,`version`);--> statement-breakpoint
CREATE TABLE `bulletins` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`number` text NOT NULL,
	`object_id` integer NOT NULL,
	`title` text NOT NULL,
	`state` text DEFAULT 'draft' NOT NULL,
	`document_json` text NOT NULL,
	`revision` integer DEFAULT 1 NOT NULL,
	`draft_version` integer DEFAULT 1 NOT NULL,
	`latest_version` integer,
	`author_id` integer,
	`updated_by_id` integer,
	`stale_reason` text,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	`updated_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`object_id`) REFERENCES `tracked_objects`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`updated_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `bulletins_number_unique` ON `bulletins` (`number`);--> statement-breakpoint
CREATE INDEX `bulletins_object_idx` ON `bulletins` (`object_id`);--> statement-breakpoint
CREATE INDEX `bulletins_state_idx` ON `bulletins` (`state`);--> statement-breakpoint
CREATE TABLE `distribution_recipients` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`distribution_id` integer NOT NULL,
	`user_id` integer,
	`email` text NOT NULL,
	`name` text NOT NULL,
	`outbox_id` integer,
	`acknowledged_at` integer,
	`acknowledge_comment` text,
	FOREIGN KEY (`distribution_id`) REFERENCES `distributions`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null,
	FOREIGN KEY (`outbox_id`) REFERENCES `mail_outbox`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `distribution_recipients_distribution_email_idx` ON `distribution_recipients` (`distribution_id`,`email`);--> statement-breakpoint
CREATE INDEX `distribution_recipients_user_idx` ON `distribution_recipients` (`user_id`);--> statement-breakpoint
CREATE TABLE `distributions` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`bulletin_id` integer NOT NULL,
	`version_id` integer NOT NULL,
	`list_id` integer NOT NULL,
	`list_name` text NOT NULL,
	`list_kind` text NOT NULL,
	`sent_by_id` integer,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`bulletin_id`) REFERENCES `bulletins`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`version_id`) REFERENCES `bulletin_versions`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`list_id`) REFERENCES `stakeholder_lists`(`id`) ON UPDATE no action ON DELETE restrict,
	FOREIGN KEY (`sent_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `distributions_version_list_idx` ON `distributions` (`version_id`,`list_id`);--> statement-breakpoint
CREATE INDEX `distributions_bulletin_idx` ON `distributions` (`bulletin_id`);--> statement-breakpoint
CREATE TABLE `mail_attachments` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`outbox_id` integer NOT NULL,
	`filename` text NOT NULL,
	`content_type` text NOT NULL,
	`content` blob NOT NULL,
	FOREIGN KEY (`outbox_id`) REFERENCES `mail_outbox`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `mail_attachments_outbox_idx` ON `mail_attachments` (`outbox_id`);--> statement-breakpoint
CREATE TABLE `stakeholder_lists` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`name` text NOT NULL,
	`kind` text NOT NULL,
	`description` text DEFAULT '' NOT NULL,
	`created_by_id` integer,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`created_by_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE UNIQUE INDEX `stakeholder_lists_name_unique` ON `stakeholder_lists` (`name`);--> statement-breakpoint
CREATE TABLE `stakeholder_members` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`list_id` integer NOT NULL,
	`user_id` integer,
	`email` text,
	`name` text,
	FOREIGN KEY (`list_id`) REFERENCES `stakeholder_lists`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `stakeholder_members_list_idx` ON `stakeholder_members` (`list_id`);--> statement-breakpoint
CREATE TABLE `stale_figure_confirmations` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`bulletin_id` integer NOT NULL,
	`draft_version` integer NOT NULL,
	`revision` integer NOT NULL,
	`reason` text NOT NULL,
	`figures_json` text NOT NULL,
	`user_id` integer,
	`created_at` integer DEFAULT (cast(unixepoch('subsecond') * 1000 as integer)) NOT NULL,
	FOREIGN KEY (`bulletin_id`) REFERENCES `bulletins`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE set null
);
--> statement-breakpoint
CREATE INDEX `stale_figure_confirmations_bulletin_idx` ON `stale_figure_confirmations` (`bulletin_id`);--> statement-breakpoint
ALTER TABLE `mail_outbox` ADD `next_attempt_at` integer;--> statement-breakpoint
ALTER TABLE `mail_outbox` ADD `claimed_until` integer;