-- A model's routes are versioned per kind (cabinet, trim) since 0039: the append-only guard on
-- process_specs must refuse a repeated (model, kind, version), not a repeated (model, version).
DROP TRIGGER IF EXISTS `process_specs_no_replace`;--> statement-breakpoint
CREATE TRIGGER `process_specs_no_replace` BEFORE INSERT ON `process_specs`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: process_specs.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `process_specs` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: process_specs.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `process_specs` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: process_specs.model_id, process_specs.route_kind, process_specs.version (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `process_specs` WHERE `model_id` = NEW.`model_id` AND `route_kind` = NEW.`route_kind` AND `version` = NEW.`version`);
END;
--> statement-breakpoint
-- A supplier's lot of trim parts is a shared source like the other lots: it sits in each trim part that came in it.
DROP TRIGGER `links_shared_matches_kind`;
--> statement-breakpoint
CREATE TRIGGER `links_shared_matches_kind` BEFORE INSERT ON `links`
WHEN NEW.shared IS NOT ((SELECT kind FROM items WHERE id = NEW.child_id) IN ('component_lot', 'unit_batch', 'maker_lot', 'flitch', 'supplier_lot'))
BEGIN
  SELECT RAISE(ABORT, 'links.shared must be true exactly when the child is a lot, a batch or a flitch');
END;
