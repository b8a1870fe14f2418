CREATE TABLE `jobs` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`kind` text NOT NULL,
	`lobe_id` integer,
	`status` text DEFAULT 'queued' NOT NULL,
	`progress` real DEFAULT 0 NOT NULL,
	`stage` text,
	`error` text,
	`params` text,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`started_at` integer,
	`finished_at` integer,
	FOREIGN KEY (`lobe_id`) REFERENCES `lobes`(`id`) ON UPDATE no action ON DELETE cascade
);
--> statement-breakpoint
CREATE INDEX `jobs_lobe_idx` ON `jobs` (`lobe_id`);--> statement-breakpoint
CREATE INDEX `jobs_status_idx` ON `jobs` (`status`);--> statement-breakpoint
CREATE TABLE `lobes` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`name` text NOT NULL,
	`owner_id` integer NOT NULL,
	`sha256` text NOT NULL,
	`source_file_name` text NOT NULL,
	`format` text NOT NULL,
	`units` text NOT NULL,
	`density` real NOT NULL,
	`reference_radius` real,
	`spin_period_hours` real,
	`spin_axis` text,
	`vertex_count` integer NOT NULL,
	`face_count` integer NOT NULL,
	`warnings` text NOT NULL,
	`report` text NOT NULL,
	`properties` text NOT NULL,
	`surface` text,
	`algorithm_version` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	FOREIGN KEY (`owner_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`sha256`) REFERENCES `mesh_files`(`sha256`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `lobes_owner_idx` ON `lobes` (`owner_id`);--> statement-breakpoint
CREATE INDEX `lobes_sha_idx` ON `lobes` (`sha256`);--> statement-breakpoint
CREATE INDEX `lobes_created_idx` ON `lobes` (`created_at`);--> statement-breakpoint
CREATE TABLE `mesh_files` (
	`sha256` text PRIMARY KEY NOT NULL,
	`format` text NOT NULL,
	`byte_size` integer NOT NULL,
	`stored_path` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL
);
--> statement-breakpoint
CREATE TABLE `studies` (
	`id` integer PRIMARY KEY AUTOINCREMENT NOT NULL,
	`owner_id` integer NOT NULL,
	`lobe_a_id` integer NOT NULL,
	`lobe_b_id` integer NOT NULL,
	`title` text,
	`input` text NOT NULL,
	`cache_key` text NOT NULL,
	`status` text DEFAULT 'queued' NOT NULL,
	`progress` real DEFAULT 0 NOT NULL,
	`stage` text,
	`error` text,
	`result` text,
	`algorithm_version` text NOT NULL,
	`created_at` integer DEFAULT (unixepoch('subsec') * 1000) NOT NULL,
	`started_at` integer,
	`finished_at` integer,
	FOREIGN KEY (`owner_id`) REFERENCES `users`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`lobe_a_id`) REFERENCES `lobes`(`id`) ON UPDATE no action ON DELETE no action,
	FOREIGN KEY (`lobe_b_id`) REFERENCES `lobes`(`id`) ON UPDATE no action ON DELETE no action
);
--> statement-breakpoint
CREATE INDEX `studies_pair_idx` ON `studies` (`lobe_a_id`,`lobe_b_id`);--> statement-breakpoint
CREATE INDEX `studies_cache_idx` ON `studies` (`cache_key`);--> statement-breakpoint
CREATE INDEX `studies_created_idx` ON `studies` (`created_at`);