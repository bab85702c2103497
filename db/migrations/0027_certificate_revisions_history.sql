-- Certificate revisions and their prints are a record like the certificates themselves
-- (lib/audit/protected.ts): never changed, never deleted, never replaced by INSERT OR REPLACE
-- (which would delete the old row without firing its DELETE trigger). The unique keys are
-- repeated here so a replacing insert is refused with the same words as a plain one.
CREATE TRIGGER `certificate_revisions_no_update` BEFORE UPDATE ON `certificate_revisions`
BEGIN
  SELECT RAISE(ABORT, 'a certificate revision is issued once and never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `certificate_revisions_no_delete` BEFORE DELETE ON `certificate_revisions`
BEGIN
  SELECT RAISE(ABORT, 'certificate revisions are never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `certificate_revisions_no_replace` BEFORE INSERT ON `certificate_revisions`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_revisions.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificate_revisions` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_revisions.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificate_revisions` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_revisions.code (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificate_revisions` WHERE `code` = NEW.`code`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_revisions.final_test_id (one revision per passing re-test)') WHERE EXISTS (SELECT 1 FROM `certificate_revisions` WHERE `final_test_id` = NEW.`final_test_id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_revisions.event_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificate_revisions` WHERE `event_id` = NEW.`event_id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_revisions.certificate_id, certificate_revisions.revision (a revision number is issued once)') WHERE EXISTS (SELECT 1 FROM `certificate_revisions` WHERE `certificate_id` = NEW.`certificate_id` AND `revision` = NEW.`revision`);
END;
--> statement-breakpoint
CREATE TRIGGER `certificate_revision_prints_no_update` BEFORE UPDATE ON `certificate_revision_prints`
BEGIN
  SELECT RAISE(ABORT, 'a certificate print is recorded once and never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `certificate_revision_prints_no_delete` BEFORE DELETE ON `certificate_revision_prints`
BEGIN
  SELECT RAISE(ABORT, 'certificate prints are never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `certificate_revision_prints_no_replace` BEFORE INSERT ON `certificate_revision_prints`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_revision_prints.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificate_revision_prints` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_revision_prints.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificate_revision_prints` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_revision_prints.event_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificate_revision_prints` WHERE `event_id` = NEW.`event_id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificate_revision_prints.revision_id (one original per revision)') WHERE NEW.`original` = 1 AND EXISTS (SELECT 1 FROM `certificate_revision_prints` WHERE `revision_id` = NEW.`revision_id` AND `original` = 1);
END;
