-- Invitation and reset mail queued before this migration holds its one-time token in plain text.
-- Each token is taken out of the outbox and replaced by a marker, as queueMail now does; for mail
-- not yet sent (no successful try, fewer than 8 tries) the token moves to mail_secrets, so the
-- sender can still deliver it and then delete it. A token is the 43 base64url characters after
-- "/invite/" or "/reset/". The outbox is append-only, so its guard is lifted for this one change.
-- secure_delete makes SQLite overwrite the old text rather than leave it in the file's free space.
PRAGMA secure_delete = ON;
--> statement-breakpoint
DROP TRIGGER `outbox_no_update`;
--> statement-breakpoint
INSERT INTO `mail_secrets` (`outbox_id`, `values`)
SELECT `id`, json_object('[[link:legacy-' || `id` || ']]', `token`)
FROM (
  SELECT o.`id`,
    CASE
      WHEN instr(o.`text`, '/invite/') > 0 THEN substr(o.`text`, instr(o.`text`, '/invite/') + 8, 43)
      WHEN instr(o.`text`, '/reset/') > 0 THEN substr(o.`text`, instr(o.`text`, '/reset/') + 7, 43)
    END AS `token`
  FROM `outbox` o
  WHERE NOT EXISTS (SELECT 1 FROM `mail_attempts` a WHERE a.`outbox_id` = o.`id` AND a.`ok`)
    AND (SELECT count(*) FROM `mail_attempts` a WHERE a.`outbox_id` = o.`id`) < 8
)
WHERE length(`token`) = 43 AND `token` NOT GLOB '*[^A-Za-z0-9_-]*';
--> statement-breakpoint
UPDATE `outbox`
SET `text` = replace(`outbox`.`text`, t.`token`, '[[link:legacy-' || `outbox`.`id` || ']]'),
    `html` = replace(`outbox`.`html`, t.`token`, '[[link:legacy-' || `outbox`.`id` || ']]')
FROM (
  SELECT `id`,
    CASE
      WHEN instr(`text`, '/invite/') > 0 THEN substr(`text`, instr(`text`, '/invite/') + 8, 43)
      WHEN instr(`text`, '/reset/') > 0 THEN substr(`text`, instr(`text`, '/reset/') + 7, 43)
    END AS `token`
  FROM `outbox`
) AS t
WHERE t.`id` = `outbox`.`id` AND length(t.`token`) = 43 AND t.`token` NOT GLOB '*[^A-Za-z0-9_-]*';
--> statement-breakpoint
CREATE TRIGGER `outbox_no_update` BEFORE UPDATE ON `outbox`
BEGIN
  SELECT RAISE(ABORT, 'queued mail is never changed');
END;
