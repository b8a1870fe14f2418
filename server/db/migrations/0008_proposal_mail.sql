ALTER TABLE `mail_preferences` ADD `proposal_mail` text DEFAULT 'each' NOT NULL;--> statement-breakpoint
ALTER TABLE `mail_preferences` ADD `digest_sent_at` integer;--> statement-breakpoint
-- Members who had turned proposal mails off keep them off.
UPDATE `mail_preferences` SET `proposal_mail` = 'none' WHERE `proposals` = 0;--> statement-breakpoint
ALTER TABLE `mail_preferences` DROP COLUMN `proposals`;
