-- A case's intake never changes; only its state moves, and only along the table of
-- lib/vocabulary/case-states.ts (CASE_TRANSITIONS). Findings are a record: never changed or deleted.
CREATE TRIGGER `service_cases_state_only` BEFORE UPDATE ON `service_cases`
WHEN NEW.`id` IS NOT OLD.`id` OR NEW.`code` IS NOT OLD.`code` OR NEW.`item_id` IS NOT OLD.`item_id` OR NEW.`pair_id` IS NOT OLD.`pair_id`
  OR NEW.`partner_id` IS NOT OLD.`partner_id` OR NEW.`dealer_id` IS NOT OLD.`dealer_id` OR NEW.`owner_id` IS NOT OLD.`owner_id`
  OR NEW.`returned_by` IS NOT OLD.`returned_by` OR NEW.`received_on` IS NOT OLD.`received_on` OR NEW.`symptom` IS NOT OLD.`symptom`
  OR NEW.`opened_at` IS NOT OLD.`opened_at` OR NEW.`event_id` IS NOT OLD.`event_id`
BEGIN
  SELECT RAISE(ABORT, 'a service case''s intake is a record: only its state moves');
END;
--> statement-breakpoint
CREATE TRIGGER `service_cases_state_moves` BEFORE UPDATE OF `state` ON `service_cases`
WHEN NEW.`state` IS NOT OLD.`state` AND NOT (
     (OLD.`state` = 'received' AND NEW.`state` IN ('diagnosed', 'cancelled'))
  OR (OLD.`state` = 'diagnosed' AND NEW.`state` IN ('waiting_part', 'waiting_payment', 'repaired', 'cancelled'))
  OR (OLD.`state` = 'waiting_part' AND NEW.`state` IN ('diagnosed', 'waiting_payment', 'repaired', 'cancelled'))
  OR (OLD.`state` = 'waiting_payment' AND NEW.`state` IN ('diagnosed', 'waiting_part', 'repaired', 'cancelled'))
  OR (OLD.`state` = 'repaired' AND NEW.`state` IN ('tested', 'diagnosed', 'cancelled'))
  OR (OLD.`state` = 'tested' AND NEW.`state` IN ('sent_back', 'cancelled'))
  OR (OLD.`state` = 'sent_back' AND NEW.`state` IN ('closed'))
)
BEGIN
  SELECT RAISE(ABORT, 'a service case moves only along its states');
END;
--> statement-breakpoint
CREATE TRIGGER `service_cases_no_delete` BEFORE DELETE ON `service_cases`
BEGIN
  SELECT RAISE(ABORT, 'a service case is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `service_cases_no_replace` BEFORE INSERT ON `service_cases`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: service_cases.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `service_cases` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: service_cases.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `service_cases` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: service_cases.code (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `service_cases` WHERE `code` = NEW.`code`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: service_cases.pair_id (one open case per pair)') WHERE NEW.`state` NOT IN ('closed', 'cancelled') AND EXISTS (SELECT 1 FROM `service_cases` WHERE `pair_id` = NEW.`pair_id` AND `state` NOT IN ('closed', 'cancelled'));
END;
--> statement-breakpoint
CREATE TRIGGER `case_findings_no_update` BEFORE UPDATE ON `case_findings`
BEGIN
  SELECT RAISE(ABORT, 'a finding is a record: it is never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `case_findings_no_delete` BEFORE DELETE ON `case_findings`
BEGIN
  SELECT RAISE(ABORT, 'a finding is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `case_findings_no_replace` BEFORE INSERT ON `case_findings`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: case_findings.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `case_findings` WHERE rowid = NEW.rowid);
END;
