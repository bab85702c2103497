-- A containment's target, reason and raise are a record; it closes once, with reason and approver.
CREATE TRIGGER `containments_close_only` BEFORE UPDATE ON `containments`
WHEN NEW.`id` IS NOT OLD.`id` OR NEW.`code` IS NOT OLD.`code` OR NEW.`target_item_id` IS NOT OLD.`target_item_id`
  OR NEW.`target_label` IS NOT OLD.`target_label` OR NEW.`station` IS NOT OLD.`station` OR NEW.`window_from` IS NOT OLD.`window_from`
  OR NEW.`window_to` IS NOT OLD.`window_to` OR NEW.`reason` IS NOT OLD.`reason` OR NEW.`severity` IS NOT OLD.`severity`
  OR NEW.`raised_at` IS NOT OLD.`raised_at` OR NEW.`raised_by` IS NOT OLD.`raised_by` OR NEW.`event_id` IS NOT OLD.`event_id`
  OR OLD.`closed_at` IS NOT NULL
BEGIN
  SELECT RAISE(ABORT, 'a containment is a record: it only closes, once');
END;
--> statement-breakpoint
CREATE TRIGGER `containments_no_delete` BEFORE DELETE ON `containments`
BEGIN
  SELECT RAISE(ABORT, 'a containment is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `containments_no_replace` BEFORE INSERT ON `containments`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: containments.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `containments` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: containments.code (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `containments` WHERE `code` = NEW.`code`);
END;
--> statement-breakpoint
-- An affected serial's facts never change; its state moves only along AFFECTED_TRANSITIONS of
-- lib/vocabulary/containments.ts, and only while its containment is open.
CREATE TRIGGER `containment_items_state_only` BEFORE UPDATE ON `containment_items`
WHEN NEW.`id` IS NOT OLD.`id` OR NEW.`containment_id` IS NOT OLD.`containment_id` OR NEW.`item_id` IS NOT OLD.`item_id`
  OR NEW.`kind` IS NOT OLD.`kind` OR NEW.`identity` IS NOT OLD.`identity` OR NEW.`pair_id` IS NOT OLD.`pair_id`
  OR NEW.`group` IS NOT OLD.`group` OR NEW.`item_state` IS NOT OLD.`item_state` OR NEW.`dealer_id` IS NOT OLD.`dealer_id`
  OR (OLD.`case_id` IS NOT NULL AND NEW.`case_id` IS NOT OLD.`case_id`)
BEGIN
  SELECT RAISE(ABORT, 'an affected serial is a record: only its state moves');
END;
--> statement-breakpoint
CREATE TRIGGER `containment_items_state_moves` BEFORE UPDATE ON `containment_items`
WHEN (NEW.`state` IS NOT OLD.`state` AND NOT (
     (OLD.`state` = 'open' AND NEW.`state` IN ('notified', 'passed', 'failed', 'cleared', 'replaced'))
  OR (OLD.`state` = 'notified' AND NEW.`state` IN ('passed', 'failed', 'cleared', 'replaced'))
  OR (OLD.`state` = 'passed' AND NEW.`state` IN ('cleared', 'replaced', 'failed'))
  OR (OLD.`state` = 'failed' AND NEW.`state` IN ('cleared', 'replaced'))
)) OR EXISTS (SELECT 1 FROM `containments` WHERE `id` = OLD.`containment_id` AND `closed_at` IS NOT NULL)
BEGIN
  SELECT RAISE(ABORT, 'an affected serial moves only along its states, while its containment is open');
END;
--> statement-breakpoint
CREATE TRIGGER `containment_items_no_delete` BEFORE DELETE ON `containment_items`
BEGIN
  SELECT RAISE(ABORT, 'an affected serial is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `containment_items_no_replace` BEFORE INSERT ON `containment_items`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: containment_items.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `containment_items` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: containment_items.containment_id, containment_items.item_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `containment_items` WHERE `containment_id` = NEW.`containment_id` AND `item_id` = NEW.`item_id`);
END;
--> statement-breakpoint
-- A containment closes only when every affected serial has been dispositioned.
CREATE TRIGGER `containments_close_when_done` BEFORE UPDATE OF `closed_at` ON `containments`
WHEN NEW.`closed_at` IS NOT NULL AND EXISTS (
  SELECT 1 FROM `containment_items` WHERE `containment_id` = NEW.`id`
    AND NOT (`state` IN ('cleared', 'replaced') OR (`state` = 'failed' AND `case_id` IS NOT NULL)))
BEGIN
  SELECT RAISE(ABORT, 'a containment closes only when every affected serial is dispositioned');
END;
--> statement-breakpoint
CREATE TRIGGER `containment_notices_no_update` BEFORE UPDATE ON `containment_notices`
BEGIN
  SELECT RAISE(ABORT, 'a notice is a record: it is never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `containment_notices_no_delete` BEFORE DELETE ON `containment_notices`
BEGIN
  SELECT RAISE(ABORT, 'a notice is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `containment_notices_no_replace` BEFORE INSERT ON `containment_notices`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: containment_notices.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `containment_notices` WHERE rowid = NEW.rowid);
END;
