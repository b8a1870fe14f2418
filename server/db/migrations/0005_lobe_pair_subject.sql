-- Contact-kinematics values describe the two lobes on their approach, not the whole body: move them to
-- the subject 'lobe-pair'. The supersede group (quantity|subject|reference radius) moves with the
-- subject, so every old group maps onto exactly one new group and the "one accepted value per group"
-- index stays satisfied. The state columns are untouched, so the record counts (triggers) stay right.
UPDATE `attachments`
SET `subject` = 'lobe-pair',
	`supersede_group` = `quantity_key` || '|lobe-pair|' || substr(`supersede_group`, length(`quantity_key` || '|whole-body|') + 1)
WHERE `subject` = 'whole-body'
	AND `quantity_key` IN ('contact.speed', 'contact.escapeSpeed', 'contact.speedFullShape', 'contact.escapeSpeedFullShape', 'contact.speedRatio', 'contact.impactAngleFromNormalDeg', 'contact.impactAngleFromTangentDeg', 'contact.normalSpeed', 'contact.massRatio');
