-- Prints made before certificate_prints existed are in the event log only. Each becomes a row:
-- per certificate the earliest print not made as a copy is the original, every other a copy
-- (prints raced before this migration may have been logged as several originals; one stays).
INSERT INTO `certificate_prints` (`id`, `certificate_id`, `original`, `actor_id`, `event_id`, `printed_at`)
SELECT
  lower(hex(randomblob(16))),
  json_extract(e.`data`, '$.certificateId'),
  CASE WHEN coalesce(json_extract(e.`data`, '$.copy'), 0) = 0 AND e.`id` = (
    SELECT min(f.`id`) FROM `events` f
    WHERE f.`type` = 'certificate.printed'
      AND json_extract(f.`data`, '$.certificateId') = json_extract(e.`data`, '$.certificateId')
      AND coalesce(json_extract(f.`data`, '$.copy'), 0) = 0
  ) THEN 1 ELSE 0 END,
  e.`actor_id`,
  e.`id`,
  e.`at`
FROM `events` e
WHERE e.`type` = 'certificate.printed'
  AND json_extract(e.`data`, '$.certificateId') IN (SELECT `id` FROM `certificates`);
--> statement-breakpoint
CREATE TRIGGER `certificate_prints_no_update` BEFORE UPDATE ON `certificate_prints`
BEGIN
  SELECT RAISE(ABORT, 'a certificate print is recorded once and never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `certificate_prints_no_delete` BEFORE DELETE ON `certificate_prints`
BEGIN
  SELECT RAISE(ABORT, 'certificate prints are never deleted');
END;
