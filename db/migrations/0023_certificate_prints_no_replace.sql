-- Certificate prints are a record like the other append-only tables (lib/audit/protected.ts): no
-- INSERT OR REPLACE may take the place of a print, which would delete the old row without firing
-- its DELETE trigger. The partial unique index "one original per certificate" is covered too.
CREATE TRIGGER `certificate_prints_no_replace` BEFORE INSERT ON `certificate_prints`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_prints.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificate_prints` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_prints.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificate_prints` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_prints.event_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificate_prints` WHERE `event_id` = NEW.`event_id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_prints.certificate_id (one original per certificate)') WHERE NEW.`original` = 1 AND EXISTS (SELECT 1 FROM `certificate_prints` WHERE `certificate_id` = NEW.`certificate_id` AND `original` = 1);
END;
