-- A carton's SSCC is printed on its label and sent to the supply chain: it never changes or goes.
CREATE TRIGGER `carton_ssccs_no_update` BEFORE UPDATE ON `carton_ssccs`
BEGIN
  SELECT RAISE(ABORT, 'a carton''s SSCC is a record: it never changes');
END;
--> statement-breakpoint
CREATE TRIGGER `carton_ssccs_no_delete` BEFORE DELETE ON `carton_ssccs`
BEGIN
  SELECT RAISE(ABORT, 'a carton''s SSCC is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `carton_ssccs_no_replace` BEFORE INSERT ON `carton_ssccs`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: carton_ssccs.carton_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `carton_ssccs` WHERE `carton_id` = NEW.`carton_id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: carton_ssccs.sscc (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `carton_ssccs` WHERE `sscc` = NEW.`sscc`);
END;
