-- Leaf allocations are history: never deleted; the only change allowed is ending an open reserve once.
CREATE TRIGGER `leaf_allocations_no_delete` BEFORE DELETE ON `leaf_allocations`
BEGIN
  SELECT RAISE(ABORT, 'leaf allocations are history: end a reserve instead of deleting it');
END;
--> statement-breakpoint
CREATE TRIGGER `leaf_allocations_end_once` BEFORE UPDATE ON `leaf_allocations`
WHEN OLD.ended_at IS NOT NULL
  OR NEW.id IS NOT OLD.id OR NEW.leaf_id IS NOT OLD.leaf_id OR NEW.pair_id IS NOT OLD.pair_id
  OR NEW.role IS NOT OLD.role OR NEW.cabinet_id IS NOT OLD.cabinet_id OR NEW.position IS NOT OLD.position
  OR NEW.orientation IS NOT OLD.orientation OR NEW.started_at IS NOT OLD.started_at OR NEW.event_id IS NOT OLD.event_id
BEGIN
  SELECT RAISE(ABORT, 'leaf allocations are history: only an open reserve may be ended, once');
END;
--> statement-breakpoint
-- The leaf's place in slicing order and its flitch never change.
CREATE TRIGGER `veneer_leaves_order_fixed` BEFORE UPDATE ON `veneer_leaves`
WHEN NEW.item_id IS NOT OLD.item_id OR NEW.flitch_id IS NOT OLD.flitch_id OR NEW.seq IS NOT OLD.seq
BEGIN
  SELECT RAISE(ABORT, 'a leaf keeps its flitch and its place in slicing order');
END;
--> statement-breakpoint
CREATE TRIGGER `veneer_leaves_no_delete` BEFORE DELETE ON `veneer_leaves`
BEGIN
  SELECT RAISE(ABORT, 'leaves are never deleted: mark a leaf unusable instead');
END;
--> statement-breakpoint
CREATE TRIGGER `flitches_no_update` BEFORE UPDATE ON `flitches`
BEGIN
  SELECT RAISE(ABORT, 'a flitch intake is a record: it is appended, never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `flitches_no_delete` BEFORE DELETE ON `flitches`
BEGIN
  SELECT RAISE(ABORT, 'a flitch intake is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `leaf_defects_no_delete` BEFORE DELETE ON `leaf_defects`
BEGIN
  SELECT RAISE(ABORT, 'defects are history: clear a defect instead of deleting it');
END;
--> statement-breakpoint
CREATE TRIGGER `leaf_defects_clear_once` BEFORE UPDATE ON `leaf_defects`
WHEN OLD.cleared_event_id IS NOT NULL
  OR NEW.id IS NOT OLD.id OR NEW.leaf_id IS NOT OLD.leaf_id OR NEW.kind IS NOT OLD.kind OR NEW.note IS NOT OLD.note
  OR NEW.position_mm IS NOT OLD.position_mm OR NEW.event_id IS NOT OLD.event_id
BEGIN
  SELECT RAISE(ABORT, 'defects are history: a defect may only be cleared, once');
END;
--> statement-breakpoint
CREATE TRIGGER `uploads_no_update` BEFORE UPDATE ON `uploads`
BEGIN
  SELECT RAISE(ABORT, 'uploads are appended, never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `uploads_no_delete` BEFORE DELETE ON `uploads`
BEGIN
  SELECT RAISE(ABORT, 'uploads are appended, never deleted');
END;
