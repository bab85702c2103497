-- Rows that record what happened are appended, never replaced. INSERT OR REPLACE (and REPLACE,
-- and an upsert) deletes the row it collides with without firing its DELETE trigger, so each
-- append-only table refuses, before the insert, a row that would collide with one already there:
-- on the rowid (which a table with a text key has too) and on every unique key. The messages keep
-- SQLite's own "UNIQUE constraint failed" wording, which the register's writers already catch.
CREATE TRIGGER `events_no_replace` BEFORE INSERT ON `events`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: events.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `events` WHERE rowid = NEW.rowid);
END;
--> statement-breakpoint
CREATE TRIGGER `links_no_replace` BEFORE INSERT ON `links`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: links.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `links` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: links.child_id (appended rows are never replaced)') WHERE NEW.ended_at IS NULL AND NEW.shared = 0 AND EXISTS (SELECT 1 FROM `links` WHERE `child_id` = NEW.`child_id` AND ended_at IS NULL AND shared = 0);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: links.parent_id, links.position (appended rows are never replaced)') WHERE NEW.ended_at IS NULL AND NEW.shared = 0 AND EXISTS (SELECT 1 FROM `links` WHERE `parent_id` = NEW.`parent_id` AND `position` = NEW.`position` AND ended_at IS NULL AND shared = 0);
END;
--> statement-breakpoint
CREATE TRIGGER `mail_attempts_no_replace` BEFORE INSERT ON `mail_attempts`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: mail_attempts.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `mail_attempts` WHERE rowid = NEW.rowid);
END;
--> statement-breakpoint
CREATE TRIGGER `outbox_no_replace` BEFORE INSERT ON `outbox`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: outbox.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `outbox` WHERE rowid = NEW.rowid);
END;
--> statement-breakpoint
CREATE TRIGGER `ownerships_no_replace` BEFORE INSERT ON `ownerships`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: ownerships.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `ownerships` WHERE rowid = NEW.rowid);
END;
--> statement-breakpoint
CREATE TRIGGER `items_no_replace` BEFORE INSERT ON `items`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: items.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `items` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: items.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `items` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: items.identity (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `items` WHERE `identity` = NEW.`identity`);
END;
--> statement-breakpoint
CREATE TRIGGER `flitches_no_replace` BEFORE INSERT ON `flitches`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: flitches.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `flitches` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: flitches.item_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `flitches` WHERE `item_id` = NEW.`item_id`);
END;
--> statement-breakpoint
CREATE TRIGGER `veneer_leaves_no_replace` BEFORE INSERT ON `veneer_leaves`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: veneer_leaves.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `veneer_leaves` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: veneer_leaves.item_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `veneer_leaves` WHERE `item_id` = NEW.`item_id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: veneer_leaves.flitch_id, veneer_leaves.seq (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `veneer_leaves` WHERE `flitch_id` = NEW.`flitch_id` AND `seq` = NEW.`seq`);
END;
--> statement-breakpoint
CREATE TRIGGER `leaf_allocations_no_replace` BEFORE INSERT ON `leaf_allocations`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: leaf_allocations.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `leaf_allocations` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: leaf_allocations.leaf_id (appended rows are never replaced)') WHERE NEW.role = 'face' AND EXISTS (SELECT 1 FROM `leaf_allocations` WHERE `leaf_id` = NEW.`leaf_id` AND role = 'face');
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: leaf_allocations.leaf_id (appended rows are never replaced)') WHERE NEW.ended_at IS NULL AND EXISTS (SELECT 1 FROM `leaf_allocations` WHERE `leaf_id` = NEW.`leaf_id` AND ended_at IS NULL);
END;
--> statement-breakpoint
CREATE TRIGGER `leaf_defects_no_replace` BEFORE INSERT ON `leaf_defects`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: leaf_defects.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `leaf_defects` WHERE rowid = NEW.rowid);
END;
--> statement-breakpoint
CREATE TRIGGER `uploads_no_replace` BEFORE INSERT ON `uploads`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: uploads.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `uploads` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: uploads.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `uploads` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: uploads.stored_name (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `uploads` WHERE `stored_name` = NEW.`stored_name`);
END;
--> statement-breakpoint
CREATE TRIGGER `unit_batches_no_replace` BEFORE INSERT ON `unit_batches`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: unit_batches.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `unit_batches` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: unit_batches.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `unit_batches` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: unit_batches.code (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `unit_batches` WHERE `code` = NEW.`code`);
END;
--> statement-breakpoint
CREATE TRIGGER `batch_units_no_replace` BEFORE INSERT ON `batch_units`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: batch_units.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `batch_units` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: batch_units.item_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `batch_units` WHERE `item_id` = NEW.`item_id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: batch_units.batch_id, batch_units.maker_serial (appended rows are never replaced)') WHERE NEW.maker_serial IS NOT NULL AND EXISTS (SELECT 1 FROM `batch_units` WHERE `batch_id` = NEW.`batch_id` AND `maker_serial` = NEW.`maker_serial` AND maker_serial IS NOT NULL);
END;
--> statement-breakpoint
CREATE TRIGGER `responses_no_replace` BEFORE INSERT ON `responses`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: responses.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `responses` WHERE rowid = NEW.rowid);
END;
--> statement-breakpoint
CREATE TRIGGER `ts_params_no_replace` BEFORE INSERT ON `ts_params`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: ts_params.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `ts_params` WHERE rowid = NEW.rowid);
END;
--> statement-breakpoint
CREATE TRIGGER `matched_sets_no_replace` BEFORE INSERT ON `matched_sets`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: matched_sets.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `matched_sets` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: matched_sets.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `matched_sets` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: matched_sets.code (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `matched_sets` WHERE `code` = NEW.`code`);
END;
--> statement-breakpoint
CREATE TRIGGER `set_members_no_replace` BEFORE INSERT ON `set_members`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: set_members.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `set_members` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: set_members.item_id (appended rows are never replaced)') WHERE NEW.ended_at IS NULL AND EXISTS (SELECT 1 FROM `set_members` WHERE `item_id` = NEW.`item_id` AND ended_at IS NULL);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: set_members.set_id, set_members.side (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `set_members` WHERE `set_id` = NEW.`set_id` AND `side` = NEW.`side`);
END;
--> statement-breakpoint
CREATE TRIGGER `crossover_parts_no_replace` BEFORE INSERT ON `crossover_parts`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: crossover_parts.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `crossover_parts` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: crossover_parts.crossover_id, crossover_parts.position (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `crossover_parts` WHERE `crossover_id` = NEW.`crossover_id` AND `position` = NEW.`position`);
END;
--> statement-breakpoint
CREATE TRIGGER `machine_tokens_no_replace` BEFORE INSERT ON `machine_tokens`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: machine_tokens.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `machine_tokens` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: machine_tokens.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `machine_tokens` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: machine_tokens.token_hash (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `machine_tokens` WHERE `token_hash` = NEW.`token_hash`);
END;
--> statement-breakpoint
CREATE TRIGGER `process_specs_no_replace` BEFORE INSERT ON `process_specs`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: process_specs.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `process_specs` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: process_specs.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `process_specs` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: process_specs.model_id, process_specs.version (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `process_specs` WHERE `model_id` = NEW.`model_id` AND `version` = NEW.`version`);
END;
--> statement-breakpoint
CREATE TRIGGER `route_starts_no_replace` BEFORE INSERT ON `route_starts`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: route_starts.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `route_starts` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: route_starts.pair_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `route_starts` WHERE `pair_id` = NEW.`pair_id`);
END;
--> statement-breakpoint
CREATE TRIGGER `route_records_no_replace` BEFORE INSERT ON `route_records`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: route_records.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `route_records` WHERE rowid = NEW.rowid);
END;
--> statement-breakpoint
CREATE TRIGGER `nonconformances_no_replace` BEFORE INSERT ON `nonconformances`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: nonconformances.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `nonconformances` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: nonconformances.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `nonconformances` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: nonconformances.code (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `nonconformances` WHERE `code` = NEW.`code`);
END;
--> statement-breakpoint
CREATE TRIGGER `final_tests_no_replace` BEFORE INSERT ON `final_tests`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: final_tests.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `final_tests` WHERE rowid = NEW.rowid);
END;
--> statement-breakpoint
CREATE TRIGGER `certificates_no_replace` BEFORE INSERT ON `certificates`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificates.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificates` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificates.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificates` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificates.pair_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificates` WHERE `pair_id` = NEW.`pair_id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: certificates.code (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `certificates` WHERE `code` = NEW.`code`);
END;
--> statement-breakpoint
CREATE TRIGGER `carton_locations_no_replace` BEFORE INSERT ON `carton_locations`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: carton_locations.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `carton_locations` WHERE rowid = NEW.rowid);
END;
--> statement-breakpoint
CREATE TRIGGER `shipment_details_no_replace` BEFORE INSERT ON `shipment_details`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: shipment_details.rowid (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `shipment_details` WHERE rowid = NEW.rowid);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: shipment_details.item_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `shipment_details` WHERE `item_id` = NEW.`item_id`);
END;
--> statement-breakpoint
-- Queued mail is a record of what the register said to whom: never deleted (attempts are appended).
CREATE TRIGGER `outbox_no_delete` BEFORE DELETE ON `outbox`
BEGIN
  SELECT RAISE(ABORT, 'queued mail is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `unit_batches_no_delete` BEFORE DELETE ON `unit_batches`
BEGIN
  SELECT RAISE(ABORT, 'a batch intake is a record: it is never deleted');
END;
--> statement-breakpoint
CREATE TRIGGER `batch_units_no_delete` BEFORE DELETE ON `batch_units`
BEGIN
  SELECT RAISE(ABORT, 'a unit keeps its batch and maker serial: it is never deleted');
END;
--> statement-breakpoint
-- An item is the register's record of a serial: its state changes, the item never goes away.
CREATE TRIGGER `items_no_delete` BEFORE DELETE ON `items`
BEGIN
  SELECT RAISE(ABORT, 'items are the register of serials: they are never deleted');
END;
--> statement-breakpoint
-- UPDATE OR REPLACE that moves a row onto another row's key deletes that row unseen; a table
-- with a text key also has a rowid, which the existing change-once triggers did not hold.
CREATE TRIGGER `items_keys_fixed` BEFORE UPDATE ON `items`
WHEN NEW.rowid IS NOT OLD.rowid OR NEW.id IS NOT OLD.id
  OR NEW.created_at IS NOT OLD.created_at OR NEW.created_event_id IS NOT OLD.created_event_id
BEGIN
  SELECT RAISE(ABORT, 'an item keeps its id and the record of its creation');
END;
--> statement-breakpoint
CREATE TRIGGER `veneer_leaves_rowid_fixed` BEFORE UPDATE ON `veneer_leaves`
WHEN NEW.rowid IS NOT OLD.rowid
BEGIN
  SELECT RAISE(ABORT, 'a leaf keeps its row');
END;
--> statement-breakpoint
CREATE TRIGGER `nonconformances_rowid_fixed` BEFORE UPDATE ON `nonconformances`
WHEN NEW.rowid IS NOT OLD.rowid
BEGIN
  SELECT RAISE(ABORT, 'a nonconformance keeps its row');
END;
--> statement-breakpoint
CREATE TRIGGER `machine_tokens_rowid_fixed` BEFORE UPDATE ON `machine_tokens`
WHEN NEW.rowid IS NOT OLD.rowid
BEGIN
  SELECT RAISE(ABORT, 'a machine token keeps its row');
END;
--> statement-breakpoint
-- The audit chain stays one line: a new event must carry a hash, name the newest event's hash as
-- its previous one (64 zeros before the first) and take the next id. appendEvent does this inside
-- its BEGIN IMMEDIATE transaction; anything else trying to add an event is refused.
CREATE TRIGGER `events_chain_linear` BEFORE INSERT ON `events`
WHEN NEW.hash IS NULL OR length(NEW.hash) <> 64
  OR NEW.prev_hash IS NOT (CASE WHEN EXISTS (SELECT 1 FROM `events`)
    THEN (SELECT `hash` FROM `events` ORDER BY `id` DESC LIMIT 1)
    ELSE '0000000000000000000000000000000000000000000000000000000000000000' END)
  OR NEW.id IS NOT coalesce((SELECT `seq` FROM sqlite_sequence WHERE `name` = 'events'), 0) + 1
BEGIN
  SELECT RAISE(ABORT, 'events are chained: append them through appendEvent, which links each to the newest');
END;
