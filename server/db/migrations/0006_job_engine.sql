ALTER TABLE `jobs` ADD `owner_id` integer REFERENCES users(id);--> statement-breakpoint
ALTER TABLE `jobs` ADD `inputs_hash` text;--> statement-breakpoint
ALTER TABLE `jobs` ADD `algorithm_version` text;--> statement-breakpoint
ALTER TABLE `jobs` ADD `attempts` integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `jobs` ADD `study_id` integer;--> statement-breakpoint
ALTER TABLE `jobs` ADD `result` text;--> statement-breakpoint
CREATE INDEX `jobs_inputs_idx` ON `jobs` (`kind`,`inputs_hash`);--> statement-breakpoint
ALTER TABLE `lobes` ADD `surface_job_id` integer;--> statement-breakpoint
ALTER TABLE `studies` ADD `job_id` integer;--> statement-breakpoint
UPDATE `lobes` SET `surface_job_id` = (SELECT max(`id`) FROM `jobs` WHERE `jobs`.`lobe_id` = `lobes`.`id` AND `jobs`.`kind` = 'surface-field');
