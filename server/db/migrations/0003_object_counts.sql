ALTER TABLE `objects` ADD `proposed_count` integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `objects` ADD `accepted_count` integer DEFAULT 0 NOT NULL;--> statement-breakpoint
CREATE INDEX `objects_proposed_count_idx` ON `objects` (`proposed_count`);--> statement-breakpoint
CREATE INDEX `objects_accepted_count_idx` ON `objects` (`accepted_count`);--> statement-breakpoint
UPDATE `objects` SET
  `proposed_count` = (SELECT count(*) FROM `attachments` a WHERE a.`object_id` = `objects`.`id` AND a.`state` = 'proposed'),
  `accepted_count` = (SELECT count(*) FROM `attachments` a WHERE a.`object_id` = `objects`.`id` AND a.`state` = 'accepted');--> statement-breakpoint
CREATE TRIGGER `attachments_count_insert` AFTER INSERT ON `attachments` BEGIN
  UPDATE `objects` SET
    `proposed_count` = `proposed_count` + (NEW.`state` = 'proposed'),
    `accepted_count` = `accepted_count` + (NEW.`state` = 'accepted')
  WHERE `id` = NEW.`object_id`;
END;--> statement-breakpoint
CREATE TRIGGER `attachments_count_update` AFTER UPDATE OF `state`, `object_id` ON `attachments` BEGIN
  UPDATE `objects` SET
    `proposed_count` = `proposed_count` - (OLD.`state` = 'proposed'),
    `accepted_count` = `accepted_count` - (OLD.`state` = 'accepted')
  WHERE `id` = OLD.`object_id`;
  UPDATE `objects` SET
    `proposed_count` = `proposed_count` + (NEW.`state` = 'proposed'),
    `accepted_count` = `accepted_count` + (NEW.`state` = 'accepted')
  WHERE `id` = NEW.`object_id`;
END;--> statement-breakpoint
CREATE TRIGGER `attachments_count_delete` AFTER DELETE ON `attachments` BEGIN
  UPDATE `objects` SET
    `proposed_count` = `proposed_count` - (OLD.`state` = 'proposed'),
    `accepted_count` = `accepted_count` - (OLD.`state` = 'accepted')
  WHERE `id` = OLD.`object_id`;
END;
