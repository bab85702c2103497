-- An owner's consent is a record: a change of mind is a new row, never an edit.
CREATE TRIGGER `owner_consents_no_update` BEFORE UPDATE ON `owner_consents`
BEGIN
  SELECT RAISE(ABORT, 'an owner''s consent is a record: give a new one instead');
END;
--> statement-breakpoint
CREATE TRIGGER `owner_consents_no_delete` BEFORE DELETE ON `owner_consents`
BEGIN
  SELECT RAISE(ABORT, 'an owner''s consent is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `owner_consents_no_replace` BEFORE INSERT ON `owner_consents`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: owner_consents.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `owner_consents` WHERE rowid = NEW.rowid);
END;
