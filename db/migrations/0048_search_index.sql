-- The search box's index (lib/search): one row per searchable text, kept by the triggers below in
-- the transaction of whatever writes the source row (the app, a script, a bulk import), so a
-- rolled-back write leaves no index row and no process holds an index in memory.
-- search_keys names what each index row points at (source + the source row's key); its id is the
-- rowid of the text in search_text (items, codes, serials, lots, references, tracking numbers) or
-- search_people (dealers and owners, which also get a cheap typo fallback). The text is stored
-- without spaces, hyphens, dots, slashes, underscores, @, commas and apostrophes (lib/search/text.ts
-- compacts a query the same way), so "cap 2506" finds LOT-CAP-2506-A. Leaves are left out: they
-- are found through their flitch.
CREATE TABLE `search_keys` (
	`id` integer PRIMARY KEY NOT NULL,
	`source` text NOT NULL,
	`ref` text NOT NULL
);
--> statement-breakpoint
CREATE UNIQUE INDEX `search_keys_source_ref` ON `search_keys` (`source`, `ref`);
--> statement-breakpoint
CREATE VIRTUAL TABLE `search_text` USING fts5(`text`, tokenize = 'trigram remove_diacritics 1');
--> statement-breakpoint
CREATE VIRTUAL TABLE `search_people` USING fts5(`text`, tokenize = 'trigram remove_diacritics 1');
--> statement-breakpoint
CREATE TRIGGER `search_item_insert` AFTER INSERT ON `items`
BEGIN
  INSERT INTO search_keys (source, ref) SELECT 'item', NEW.id WHERE NEW.kind <> 'leaf';
  INSERT INTO search_text (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.identity || CASE WHEN NEW.kind IN ('maker_lot', 'supplier_lot', 'component_lot', 'unit_batch') THEN ' ' || coalesce(json_extract(NEW.attrs, '$.lot'), '') ELSE '' END, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'item' AND ref = NEW.id AND NEW.kind <> 'leaf';
END;
--> statement-breakpoint
CREATE TRIGGER `search_item_update` AFTER UPDATE OF `kind`, `identity`, `attrs` ON `items`
BEGIN
  DELETE FROM search_text WHERE rowid = (SELECT id FROM search_keys WHERE source = 'item' AND ref = OLD.id);
  DELETE FROM search_keys WHERE source = 'item' AND ref = OLD.id;
  INSERT INTO search_keys (source, ref) SELECT 'item', NEW.id WHERE NEW.kind <> 'leaf';
  INSERT INTO search_text (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.identity || CASE WHEN NEW.kind IN ('maker_lot', 'supplier_lot', 'component_lot', 'unit_batch') THEN ' ' || coalesce(json_extract(NEW.attrs, '$.lot'), '') ELSE '' END, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'item' AND ref = NEW.id AND NEW.kind <> 'leaf';
END;
--> statement-breakpoint
CREATE TRIGGER `search_item_delete` AFTER DELETE ON `items`
BEGIN
  DELETE FROM search_text WHERE rowid = (SELECT id FROM search_keys WHERE source = 'item' AND ref = OLD.id);
  DELETE FROM search_keys WHERE source = 'item' AND ref = OLD.id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_maker_serial_insert` AFTER INSERT ON `batch_units`
BEGIN
  INSERT INTO search_keys (source, ref) SELECT 'maker_serial', NEW.item_id WHERE NEW.maker_serial IS NOT NULL AND NEW.maker_serial <> '';
  INSERT INTO search_text (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.maker_serial, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'maker_serial' AND ref = NEW.item_id AND NEW.maker_serial IS NOT NULL AND NEW.maker_serial <> '';
END;
--> statement-breakpoint
CREATE TRIGGER `search_maker_serial_update` AFTER UPDATE OF `maker_serial` ON `batch_units`
BEGIN
  DELETE FROM search_text WHERE rowid = (SELECT id FROM search_keys WHERE source = 'maker_serial' AND ref = OLD.item_id);
  DELETE FROM search_keys WHERE source = 'maker_serial' AND ref = OLD.item_id;
  INSERT INTO search_keys (source, ref) SELECT 'maker_serial', NEW.item_id WHERE NEW.maker_serial IS NOT NULL AND NEW.maker_serial <> '';
  INSERT INTO search_text (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.maker_serial, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'maker_serial' AND ref = NEW.item_id AND NEW.maker_serial IS NOT NULL AND NEW.maker_serial <> '';
END;
--> statement-breakpoint
CREATE TRIGGER `search_maker_serial_delete` AFTER DELETE ON `batch_units`
BEGIN
  DELETE FROM search_text WHERE rowid = (SELECT id FROM search_keys WHERE source = 'maker_serial' AND ref = OLD.item_id);
  DELETE FROM search_keys WHERE source = 'maker_serial' AND ref = OLD.item_id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_log_reference_insert` AFTER INSERT ON `flitches`
BEGIN
  INSERT INTO search_keys (source, ref) SELECT 'log_reference', NEW.item_id WHERE NEW.log_reference <> '';
  INSERT INTO search_text (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.log_reference, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'log_reference' AND ref = NEW.item_id AND NEW.log_reference <> '';
END;
--> statement-breakpoint
CREATE TRIGGER `search_log_reference_update` AFTER UPDATE OF `log_reference` ON `flitches`
BEGIN
  DELETE FROM search_text WHERE rowid = (SELECT id FROM search_keys WHERE source = 'log_reference' AND ref = OLD.item_id);
  DELETE FROM search_keys WHERE source = 'log_reference' AND ref = OLD.item_id;
  INSERT INTO search_keys (source, ref) SELECT 'log_reference', NEW.item_id WHERE NEW.log_reference <> '';
  INSERT INTO search_text (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.log_reference, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'log_reference' AND ref = NEW.item_id AND NEW.log_reference <> '';
END;
--> statement-breakpoint
CREATE TRIGGER `search_log_reference_delete` AFTER DELETE ON `flitches`
BEGIN
  DELETE FROM search_text WHERE rowid = (SELECT id FROM search_keys WHERE source = 'log_reference' AND ref = OLD.item_id);
  DELETE FROM search_keys WHERE source = 'log_reference' AND ref = OLD.item_id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_tracking_insert` AFTER INSERT ON `shipment_details`
BEGIN
  INSERT INTO search_keys (source, ref) SELECT 'tracking', NEW.item_id WHERE NEW.tracking <> '';
  INSERT INTO search_text (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.tracking, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'tracking' AND ref = NEW.item_id AND NEW.tracking <> '';
END;
--> statement-breakpoint
CREATE TRIGGER `search_tracking_update` AFTER UPDATE OF `tracking` ON `shipment_details`
BEGIN
  DELETE FROM search_text WHERE rowid = (SELECT id FROM search_keys WHERE source = 'tracking' AND ref = OLD.item_id);
  DELETE FROM search_keys WHERE source = 'tracking' AND ref = OLD.item_id;
  INSERT INTO search_keys (source, ref) SELECT 'tracking', NEW.item_id WHERE NEW.tracking <> '';
  INSERT INTO search_text (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.tracking, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'tracking' AND ref = NEW.item_id AND NEW.tracking <> '';
END;
--> statement-breakpoint
CREATE TRIGGER `search_tracking_delete` AFTER DELETE ON `shipment_details`
BEGIN
  DELETE FROM search_text WHERE rowid = (SELECT id FROM search_keys WHERE source = 'tracking' AND ref = OLD.item_id);
  DELETE FROM search_keys WHERE source = 'tracking' AND ref = OLD.item_id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_case_insert` AFTER INSERT ON `service_cases`
BEGIN
  INSERT INTO search_keys (source, ref) SELECT 'case', NEW.id;
  INSERT INTO search_text (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.code, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'case' AND ref = NEW.id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_case_update` AFTER UPDATE OF `code` ON `service_cases`
BEGIN
  DELETE FROM search_text WHERE rowid = (SELECT id FROM search_keys WHERE source = 'case' AND ref = OLD.id);
  DELETE FROM search_keys WHERE source = 'case' AND ref = OLD.id;
  INSERT INTO search_keys (source, ref) SELECT 'case', NEW.id;
  INSERT INTO search_text (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.code, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'case' AND ref = NEW.id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_case_delete` AFTER DELETE ON `service_cases`
BEGIN
  DELETE FROM search_text WHERE rowid = (SELECT id FROM search_keys WHERE source = 'case' AND ref = OLD.id);
  DELETE FROM search_keys WHERE source = 'case' AND ref = OLD.id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_containment_insert` AFTER INSERT ON `containments`
BEGIN
  INSERT INTO search_keys (source, ref) SELECT 'containment', NEW.id;
  INSERT INTO search_text (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.code, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'containment' AND ref = NEW.id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_containment_update` AFTER UPDATE OF `code` ON `containments`
BEGIN
  DELETE FROM search_text WHERE rowid = (SELECT id FROM search_keys WHERE source = 'containment' AND ref = OLD.id);
  DELETE FROM search_keys WHERE source = 'containment' AND ref = OLD.id;
  INSERT INTO search_keys (source, ref) SELECT 'containment', NEW.id;
  INSERT INTO search_text (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.code, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'containment' AND ref = NEW.id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_containment_delete` AFTER DELETE ON `containments`
BEGIN
  DELETE FROM search_text WHERE rowid = (SELECT id FROM search_keys WHERE source = 'containment' AND ref = OLD.id);
  DELETE FROM search_keys WHERE source = 'containment' AND ref = OLD.id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_dealer_insert` AFTER INSERT ON `dealers`
BEGIN
  INSERT INTO search_keys (source, ref) SELECT 'dealer', NEW.id;
  INSERT INTO search_people (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.name || ' ' || NEW.code || ' ' || NEW.city, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'dealer' AND ref = NEW.id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_dealer_update` AFTER UPDATE OF `name`, `code`, `city` ON `dealers`
BEGIN
  DELETE FROM search_people WHERE rowid = (SELECT id FROM search_keys WHERE source = 'dealer' AND ref = OLD.id);
  DELETE FROM search_keys WHERE source = 'dealer' AND ref = OLD.id;
  INSERT INTO search_keys (source, ref) SELECT 'dealer', NEW.id;
  INSERT INTO search_people (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.name || ' ' || NEW.code || ' ' || NEW.city, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'dealer' AND ref = NEW.id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_dealer_delete` AFTER DELETE ON `dealers`
BEGIN
  DELETE FROM search_people WHERE rowid = (SELECT id FROM search_keys WHERE source = 'dealer' AND ref = OLD.id);
  DELETE FROM search_keys WHERE source = 'dealer' AND ref = OLD.id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_owner_insert` AFTER INSERT ON `owners`
BEGIN
  INSERT INTO search_keys (source, ref) SELECT 'owner', NEW.id;
  INSERT INTO search_people (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.name || ' ' || coalesce(NEW.email, '') || ' ' || NEW.town, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'owner' AND ref = NEW.id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_owner_update` AFTER UPDATE OF `name`, `email`, `town` ON `owners`
BEGIN
  DELETE FROM search_people WHERE rowid = (SELECT id FROM search_keys WHERE source = 'owner' AND ref = OLD.id);
  DELETE FROM search_keys WHERE source = 'owner' AND ref = OLD.id;
  INSERT INTO search_keys (source, ref) SELECT 'owner', NEW.id;
  INSERT INTO search_people (rowid, text) SELECT id, replace(replace(replace(replace(replace(replace(replace(replace(NEW.name || ' ' || coalesce(NEW.email, '') || ' ' || NEW.town, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys WHERE source = 'owner' AND ref = NEW.id;
END;
--> statement-breakpoint
CREATE TRIGGER `search_owner_delete` AFTER DELETE ON `owners`
BEGIN
  DELETE FROM search_people WHERE rowid = (SELECT id FROM search_keys WHERE source = 'owner' AND ref = OLD.id);
  DELETE FROM search_keys WHERE source = 'owner' AND ref = OLD.id;
END;
--> statement-breakpoint
-- The box's exact look-up of a maker's serial ignores case (makers print either): an index it can use.
CREATE INDEX `batch_units_maker_serial_nocase` ON `batch_units` (`maker_serial` COLLATE NOCASE) WHERE `maker_serial` IS NOT NULL;
--> statement-breakpoint
-- …and of a maker's lot by its lot code or its whole name: small partial indexes over the makers' lots
-- alone, so the look-up does not read every lot's row (hundreds of random pages in a big register).
CREATE INDEX `items_maker_lot_code_nocase` ON `items` (json_extract(`attrs`, '$.lot') COLLATE NOCASE) WHERE `kind` = 'maker_lot';
--> statement-breakpoint
CREATE INDEX `items_maker_lot_identity_nocase` ON `items` (`identity` COLLATE NOCASE) WHERE `kind` = 'maker_lot';
--> statement-breakpoint
-- The register as it stands when this migration runs: every source row is indexed once.
INSERT INTO search_keys (source, ref) SELECT 'item', s.id FROM `items` s WHERE s.kind <> 'leaf' ORDER BY s.rowid;
--> statement-breakpoint
INSERT INTO search_text (rowid, text) SELECT k.id, replace(replace(replace(replace(replace(replace(replace(replace(s.identity || CASE WHEN s.kind IN ('maker_lot', 'supplier_lot', 'component_lot', 'unit_batch') THEN ' ' || coalesce(json_extract(s.attrs, '$.lot'), '') ELSE '' END, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys k JOIN `items` s ON s.id = k.ref WHERE k.source = 'item';
--> statement-breakpoint
INSERT INTO search_keys (source, ref) SELECT 'maker_serial', s.item_id FROM `batch_units` s WHERE s.maker_serial IS NOT NULL AND s.maker_serial <> '' ORDER BY s.rowid;
--> statement-breakpoint
INSERT INTO search_text (rowid, text) SELECT k.id, replace(replace(replace(replace(replace(replace(replace(replace(s.maker_serial, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys k JOIN `batch_units` s ON s.item_id = k.ref WHERE k.source = 'maker_serial';
--> statement-breakpoint
INSERT INTO search_keys (source, ref) SELECT 'log_reference', s.item_id FROM `flitches` s WHERE s.log_reference <> '' ORDER BY s.rowid;
--> statement-breakpoint
INSERT INTO search_text (rowid, text) SELECT k.id, replace(replace(replace(replace(replace(replace(replace(replace(s.log_reference, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys k JOIN `flitches` s ON s.item_id = k.ref WHERE k.source = 'log_reference';
--> statement-breakpoint
INSERT INTO search_keys (source, ref) SELECT 'tracking', s.item_id FROM `shipment_details` s WHERE s.tracking <> '' ORDER BY s.rowid;
--> statement-breakpoint
INSERT INTO search_text (rowid, text) SELECT k.id, replace(replace(replace(replace(replace(replace(replace(replace(s.tracking, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys k JOIN `shipment_details` s ON s.item_id = k.ref WHERE k.source = 'tracking';
--> statement-breakpoint
INSERT INTO search_keys (source, ref) SELECT 'case', s.id FROM `service_cases` s ORDER BY s.rowid;
--> statement-breakpoint
INSERT INTO search_text (rowid, text) SELECT k.id, replace(replace(replace(replace(replace(replace(replace(replace(s.code, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys k JOIN `service_cases` s ON s.id = k.ref WHERE k.source = 'case';
--> statement-breakpoint
INSERT INTO search_keys (source, ref) SELECT 'containment', s.id FROM `containments` s ORDER BY s.rowid;
--> statement-breakpoint
INSERT INTO search_text (rowid, text) SELECT k.id, replace(replace(replace(replace(replace(replace(replace(replace(s.code, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys k JOIN `containments` s ON s.id = k.ref WHERE k.source = 'containment';
--> statement-breakpoint
INSERT INTO search_keys (source, ref) SELECT 'dealer', s.id FROM `dealers` s ORDER BY s.rowid;
--> statement-breakpoint
INSERT INTO search_people (rowid, text) SELECT k.id, replace(replace(replace(replace(replace(replace(replace(replace(s.name || ' ' || s.code || ' ' || s.city, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys k JOIN `dealers` s ON s.id = k.ref WHERE k.source = 'dealer';
--> statement-breakpoint
INSERT INTO search_keys (source, ref) SELECT 'owner', s.id FROM `owners` s ORDER BY s.rowid;
--> statement-breakpoint
INSERT INTO search_people (rowid, text) SELECT k.id, replace(replace(replace(replace(replace(replace(replace(replace(s.name || ' ' || coalesce(s.email, '') || ' ' || s.town, ' ', ''), '-', ''), '.', ''), '/', ''), '_', ''), '@', ''), ',', ''), '''', '') FROM search_keys k JOIN `owners` s ON s.id = k.ref WHERE k.source = 'owner';
