-- A correction is a record like the one it corrects: appended, never changed, never deleted.
CREATE TRIGGER `route_corrections_no_update` BEFORE UPDATE ON `route_corrections`
BEGIN
  SELECT RAISE(ABORT, 'a correction is a record: correct it again with a new correction, never by changing it');
END;
--> statement-breakpoint
CREATE TRIGGER `route_corrections_no_delete` BEFORE DELETE ON `route_corrections`
BEGIN
  SELECT RAISE(ABORT, 'a correction is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `route_corrections_no_replace` BEFORE INSERT ON `route_corrections`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: route_corrections.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `route_corrections` WHERE rowid = NEW.rowid);
END;
--> statement-breakpoint
-- A correction corrects a record of the same pair.
CREATE TRIGGER `route_corrections_same_pair` BEFORE INSERT ON `route_corrections`
WHEN NOT EXISTS (SELECT 1 FROM `route_records` WHERE `id` = NEW.`record_id` AND `pair_id` = NEW.`pair_id`)
BEGIN
  SELECT RAISE(ABORT, 'a correction corrects a route record of the same pair');
END;
