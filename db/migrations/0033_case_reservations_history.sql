-- A case's reservation of a replacement part is a record: it is appended, ends once (fitted or
-- released) and is never deleted. A unit is held by a service case or by a lab matched set, never
-- by both: each side refuses the other's open hold, so neither the lab's matching nor another case
-- can take a unit a case holds. The messages start like SQLite's own UNIQUE failures, so the code
-- that turns a lost race into a message for the desk or the lab reads them the same way.
CREATE TRIGGER `case_reservations_end_once` BEFORE UPDATE ON `case_reservations`
WHEN OLD.`ended_at` IS NOT NULL
  OR NEW.`id` IS NOT OLD.`id` OR NEW.`case_id` IS NOT OLD.`case_id` OR NEW.`item_id` IS NOT OLD.`item_id`
  OR NEW.`side` IS NOT OLD.`side` OR NEW.`position` IS NOT OLD.`position` OR NEW.`event_id` IS NOT OLD.`event_id`
  OR NEW.`created_at` IS NOT OLD.`created_at`
  OR NEW.`end_reason` NOT IN ('fitted', 'released')
BEGIN
  SELECT RAISE(ABORT, 'a case reservation is history: only an open reservation may be ended, once, as fitted or released');
END;
--> statement-breakpoint
CREATE TRIGGER `case_reservations_no_delete` BEFORE DELETE ON `case_reservations`
BEGIN
  SELECT RAISE(ABORT, 'a case reservation is history: end it instead of deleting it');
END;
--> statement-breakpoint
CREATE TRIGGER `case_reservations_no_replace` BEFORE INSERT ON `case_reservations`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: case_reservations.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `case_reservations` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: case_reservations.item_id (the unit is reserved for a service case already)') WHERE NEW.`ended_at` IS NULL AND EXISTS (SELECT 1 FROM `case_reservations` WHERE `item_id` = NEW.`item_id` AND `ended_at` IS NULL);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: case_reservations.case_id, case_reservations.side, case_reservations.position (that place holds a reservation already)') WHERE NEW.`ended_at` IS NULL AND EXISTS (SELECT 1 FROM `case_reservations` WHERE `case_id` = NEW.`case_id` AND `side` = NEW.`side` AND `position` = NEW.`position` AND `ended_at` IS NULL);
END;
--> statement-breakpoint
CREATE TRIGGER `case_reservations_opened_right` BEFORE INSERT ON `case_reservations`
WHEN NEW.`side` NOT IN ('L', 'R') OR NEW.`ended_at` IS NOT NULL OR NEW.`end_event_id` IS NOT NULL OR NEW.`end_reason` IS NOT NULL
BEGIN
  SELECT RAISE(ABORT, 'a case reservation starts open, for the left (L) or right (R) speaker');
END;
--> statement-breakpoint
CREATE TRIGGER `case_reservations_not_in_set` BEFORE INSERT ON `case_reservations`
WHEN EXISTS (SELECT 1 FROM `set_members` WHERE `item_id` = NEW.`item_id` AND `ended_at` IS NULL)
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: case_reservations.item_id (the unit is reserved in a matched set)');
END;
--> statement-breakpoint
CREATE TRIGGER `set_members_not_in_case` BEFORE INSERT ON `set_members`
WHEN NEW.`ended_at` IS NULL AND EXISTS (SELECT 1 FROM `case_reservations` WHERE `item_id` = NEW.`item_id` AND `ended_at` IS NULL)
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: set_members.item_id (the unit is reserved for a service case)');
END;
