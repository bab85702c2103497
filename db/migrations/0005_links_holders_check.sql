-- Fill the copied parent columns of links written before they existed. The end-once trigger
-- would refuse touching ended links, so it steps aside for this one statement.
DROP TRIGGER `links_end_once`;
--> statement-breakpoint
UPDATE `links` SET
  `parent_kind` = (SELECT `kind` FROM `items` WHERE `items`.`id` = `links`.`parent_id`),
  `parent_identity` = (SELECT `identity` FROM `items` WHERE `items`.`id` = `links`.`parent_id`);
--> statement-breakpoint
CREATE TRIGGER `links_end_once` BEFORE UPDATE ON `links`
WHEN OLD.ended_at IS NOT NULL
  OR NEW.id IS NOT OLD.id OR NEW.parent_id IS NOT OLD.parent_id OR NEW.child_id IS NOT OLD.child_id
  OR NEW.position IS NOT OLD.position OR NEW.shared IS NOT OLD.shared
  OR NEW.started_at IS NOT OLD.started_at OR NEW.fit_event_id IS NOT OLD.fit_event_id
  OR NEW.parent_kind IS NOT OLD.parent_kind OR NEW.parent_identity IS NOT OLD.parent_identity
BEGIN
  SELECT RAISE(ABORT, 'links are history: only an open link may be ended, once');
END;
--> statement-breakpoint
-- The copies must be the parent's own kind and identity.
CREATE TRIGGER `links_parent_copy_matches` BEFORE INSERT ON `links`
WHEN NEW.parent_kind IS NOT (SELECT kind FROM items WHERE id = NEW.parent_id)
  OR NEW.parent_identity IS NOT (SELECT identity FROM items WHERE id = NEW.parent_id)
BEGIN
  SELECT RAISE(ABORT, 'links.parent_kind and parent_identity must be the parent item''s own');
END;
--> statement-breakpoint
-- An item's identity and kind are what every label, link and trace refers to: they never change.
CREATE TRIGGER `items_identity_fixed` BEFORE UPDATE OF `identity`, `kind` ON `items`
WHEN NEW.identity IS NOT OLD.identity OR NEW.kind IS NOT OLD.kind
BEGIN
  SELECT RAISE(ABORT, 'an item''s identity and kind never change');
END;
