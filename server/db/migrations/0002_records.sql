CREATE TABLE `attachment_comments` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`attachment_id` integer NOT NULL,
	`author_id` integer NOT NULL,
	`kind` text DEFAULT 'comment' NOT NULL,
	`body` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`attachment_id`) REFERENCES `attachments`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`author_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `attachment_comments_attachment_idx` ON `attachment_comments` (`attachment_id`,`id`);--> statement-breakpoint
CREATE TABLE `attachments` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`object_id` integer NOT NULL,
	`quantity_key` text NOT NULL,
	`subject` text NOT NULL,
	`value` text NOT NULL,
	`unit` text NOT NULL,
	`spread` text,
	`reference_radius` real,
	`supersede_group` text NOT NULL,
	`lobe_id` integer,
	`study_id` integer,
	`provenance` text NOT NULL,
	`note` text DEFAULT '' NOT NULL,
	`state` text DEFAULT 'proposed' NOT NULL,
	`proposed_by` integer NOT NULL,
	`proposed_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`reviewed_by` integer,
	`reviewed_at` integer,
	`review_comment` text,
	`superseded_by` integer,
	`superseded_at` integer,
	FOREIGN KEY (`object_id`) REFERENCES `objects`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`lobe_id`) REFERENCES `lobes`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`study_id`) REFERENCES `studies`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`proposed_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`reviewed_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `attachments_object_state_idx` ON `attachments` (`object_id`,`state`);--> statement-breakpoint
CREATE INDEX `attachments_object_group_idx` ON `attachments` (`object_id`,`supersede_group`,`state`);--> statement-breakpoint
CREATE UNIQUE INDEX `attachments_current_unique` ON `attachments` (`object_id`,`supersede_group`) WHERE "attachments"."state" = 'accepted';--> statement-breakpoint
CREATE INDEX `attachments_state_object_idx` ON `attachments` (`state`,`object_id`);--> statement-breakpoint
CREATE INDEX `attachments_lobe_idx` ON `attachments` (`lobe_id`);--> statement-breakpoint
CREATE INDEX `attachments_study_idx` ON `attachments` (`study_id`);--> statement-breakpoint
CREATE INDEX `attachments_proposer_idx` ON `attachments` (`proposed_by`);--> statement-breakpoint
CREATE TABLE `mail_preferences` (
	`user_id` integer PRIMARY KEY NOT NULL,
	`proposals` integer DEFAULT true NOT NULL,
	`decisions` integer DEFAULT true NOT NULL,
	`comments` integer DEFAULT true NOT NULL,
	`updated_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE TABLE `object_follows` (
	`object_id` integer NOT NULL,
	`user_id` integer NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`object_id`) REFERENCES `objects`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`user_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `object_follows_unique` ON `object_follows` (`object_id`,`user_id`);--> statement-breakpoint
CREATE INDEX `object_follows_user_idx` ON `object_follows` (`user_id`);--> statement-breakpoint
CREATE TABLE `object_links` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`object_id` integer NOT NULL,
	`lobe_id` integer,
	`study_id` integer,
	`via` text NOT NULL,
	`linked_by` integer NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`object_id`) REFERENCES `objects`(`id`) ON UPDATE no action ON DELETE cascade,
	FOREIGN KEY (`lobe_id`) REFERENCES `lobes`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`study_id`) REFERENCES `studies`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`linked_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `object_links_lobe_unique` ON `object_links` (`object_id`,`lobe_id`) WHERE "object_links"."lobe_id" is not null;--> statement-breakpoint
CREATE UNIQUE INDEX `object_links_study_unique` ON `object_links` (`object_id`,`study_id`) WHERE "object_links"."study_id" is not null;--> statement-breakpoint
CREATE INDEX `object_links_lobe_idx` ON `object_links` (`lobe_id`);--> statement-breakpoint
CREATE INDEX `object_links_study_idx` ON `object_links` (`study_id`);--> statement-breakpoint
CREATE TABLE `object_tags` (
	`object_id` integer NOT NULL,
	`tag` text NOT NULL,
	FOREIGN KEY (`object_id`) REFERENCES `objects`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE UNIQUE INDEX `object_tags_unique` ON `object_tags` (`object_id`,`tag`);--> statement-breakpoint
CREATE INDEX `object_tags_tag_idx` ON `object_tags` (`tag`,`object_id`);--> statement-breakpoint
CREATE TABLE `objects` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`designation` text NOT NULL,
	`name` text NOT NULL,
	`population` text NOT NULL,
	`notes` text DEFAULT '' NOT NULL,
	`orbit_a_au` real,
	`orbit_e` real,
	`orbit_i_deg` real,
	`tags` text DEFAULT '[]' NOT NULL,
	`created_by` integer NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`updated_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE UNIQUE INDEX `objects_designation_unique` ON `objects` ("designation" collate nocase);--> statement-breakpoint
CREATE INDEX `objects_name_idx` ON `objects` ("name" collate nocase);--> statement-breakpoint
CREATE INDEX `objects_population_idx` ON `objects` (`population`,"designation" collate nocase);--> statement-breakpoint
CREATE INDEX `objects_created_idx` ON `objects` (`created_at`);--> statement-breakpoint
CREATE INDEX `objects_updated_idx` ON `objects` (`updated_at`);