-- Links are history: never deleted; the only change allowed is ending an open link once.
CREATE TRIGGER `links_no_delete` BEFORE DELETE ON `links`
BEGIN
  SELECT RAISE(ABORT, 'links are history: end a link instead of deleting it');
END;
--> statement-breakpoint
CREATE TRIGGER `links_end_once` BEFORE UPDATE ON `links`
WHEN OLD.ended_at IS NOT NULL
  OR NEW.id IS NOT OLD.id OR NEW.parent_id IS NOT OLD.parent_id OR NEW.child_id IS NOT OLD.child_id
  OR NEW.position IS NOT OLD.position OR NEW.shared IS NOT OLD.shared
  OR NEW.started_at IS NOT OLD.started_at OR NEW.fit_event_id IS NOT OLD.fit_event_id
BEGIN
  SELECT RAISE(ABORT, 'links are history: only an open link may be ended, once');
END;
--> statement-breakpoint
-- The shared flag must match the child's kind, so the one-parent index cannot be sidestepped.
CREATE TRIGGER `links_shared_matches_kind` BEFORE INSERT ON `links`
WHEN NEW.shared IS NOT ((SELECT kind FROM items WHERE id = NEW.child_id) = 'component_lot')
BEGIN
  SELECT RAISE(ABORT, 'links.shared must be true exactly when the child is a lot');
END;
--> statement-breakpoint
CREATE TRIGGER `ownerships_no_update` BEFORE UPDATE ON `ownerships`
BEGIN
  SELECT RAISE(ABORT, 'ownerships are appended, never changed');
END;
--> statement-breakpoint
CREATE TRIGGER `ownerships_no_delete` BEFORE DELETE ON `ownerships`
BEGIN
  SELECT RAISE(ABORT, 'ownerships are appended, never deleted');
END;
