-- A model version is a record: later versions are appended, never written over.
CREATE TRIGGER `model_versions_no_update` BEFORE UPDATE ON `model_versions`
BEGIN
  SELECT RAISE(ABORT, 'a model version is fixed: change the model by saving a new version');
END;
--> statement-breakpoint
CREATE TRIGGER `model_versions_no_delete` BEFORE DELETE ON `model_versions`
BEGIN
  SELECT RAISE(ABORT, 'model versions are never deleted: pairs were made under them');
END;
--> statement-breakpoint
CREATE TRIGGER `model_versions_no_replace` BEFORE INSERT ON `model_versions`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: model_versions.id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `model_versions` WHERE `id` = NEW.`id`);
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: model_versions.model_id, model_versions.version (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `model_versions` WHERE `model_id` = NEW.`model_id` AND `version` = NEW.`version`);
END;
--> statement-breakpoint
CREATE TRIGGER `item_model_versions_no_update` BEFORE UPDATE ON `item_model_versions`
BEGIN
  SELECT RAISE(ABORT, 'an item keeps the model version it was made under');
END;
--> statement-breakpoint
CREATE TRIGGER `item_model_versions_no_delete` BEFORE DELETE ON `item_model_versions`
BEGIN
  SELECT RAISE(ABORT, 'an item keeps the model version it was made under');
END;
--> statement-breakpoint
CREATE TRIGGER `item_model_versions_no_replace` BEFORE INSERT ON `item_model_versions`
BEGIN
  SELECT RAISE(ABORT, 'UNIQUE constraint failed: item_model_versions.item_id (appended rows are never replaced)') WHERE EXISTS (SELECT 1 FROM `item_model_versions` WHERE `item_id` = NEW.`item_id`);
END;
--> statement-breakpoint
-- Every item of a model is pinned to the model's newest version as it is registered, whichever
-- code registers it, so a pair in progress keeps the spec it started under.
CREATE TRIGGER `items_pin_model_version` AFTER INSERT ON `items`
WHEN NEW.`model_id` IS NOT NULL
BEGIN
  INSERT INTO `item_model_versions` (`item_id`, `model_version_id`)
  SELECT NEW.`id`, `id` FROM `model_versions` WHERE `model_id` = NEW.`model_id` ORDER BY `version` DESC LIMIT 1;
END;
--> statement-breakpoint
-- Every model so far has its one crossover board at XO.
INSERT INTO `model_crossover_positions` (`model_id`, `position`, `count`) SELECT `id`, 'XO', 1 FROM `models`;
--> statement-breakpoint
-- Version 1 of every model is the model as it stands (lib/workshop/model-spec.ts's shape);
-- json() keeps each list JSON inside the object rather than a string.
INSERT INTO `model_versions` (`id`, `model_id`, `version`, `spec`, `note`, `created_by`, `created_at`, `event_id`)
SELECT lower(hex(randomblob(15))), m.`id`, 1, json_object(
    'code', m.`code`, 'name', m.`name`, 'leavesPerFace', m.`leaves_per_face`,
    'minLeafLengthMm', m.`min_leaf_length_mm`, 'minLeafWidthMm', m.`min_leaf_width_mm`,
    'pairResponseLimitDb', m.`pair_response_limit_db`, 'responseMinHz', m.`response_min_hz`, 'responseMaxHz', m.`response_max_hz`,
    'pairGtin', m.`pair_gtin`, 'warrantyMonths', m.`warranty_months`,
    'positions', json((SELECT json_group_array(json_object('position', p.`position`, 'partType', p.`part_type`, 'count', p.`count`))
                       FROM (SELECT * FROM `model_positions` WHERE `model_id` = m.`id` ORDER BY `position`) p)),
    'crossovers', json_array(json_object('position', 'XO', 'count', 1)),
    'trimPositions', json((SELECT json_group_array(json_object('position', t.`position`, 'label', t.`label`, 'count', t.`count`))
                           FROM (SELECT * FROM `model_trim_positions` WHERE `model_id` = m.`id` ORDER BY `position`) t)),
    'tolerances', json((SELECT json_group_array(json_object('partType', x.`part_type`, 'mismatchLimitDb', x.`mismatch_limit_db`))
                        FROM (SELECT * FROM `model_tolerances` WHERE `model_id` = m.`id` ORDER BY `part_type`) x)),
    'packingList', json((SELECT json_group_array(k.`label`)
                         FROM (SELECT `label` FROM `packing_items` WHERE `model_id` = m.`id`
                                 AND lower(trim(`label`)) NOT IN ('left speaker', 'right speaker', 'certificate') ORDER BY `position`) k))
  ), 'The model as it stood when model versions began.', NULL, CAST(strftime('%s', 'now') AS INTEGER) * 1000, NULL
FROM `models` m;
--> statement-breakpoint
INSERT INTO `item_model_versions` (`item_id`, `model_version_id`)
SELECT i.`id`, v.`id` FROM `items` i JOIN `model_versions` v ON v.`model_id` = i.`model_id` AND v.`version` = 1;
--> statement-breakpoint
-- A species' detail was "botanical name, cut"; a lacquer's "sheen, sRGB #RRGGBB". Split them into their columns.
UPDATE `finishes` SET
  `botanical_name` = trim(substr(`detail`, 1, instr(`detail`, ',') - 1)),
  `cut` = CASE lower(trim(substr(`detail`, instr(`detail`, ',') + 1)))
    WHEN 'crown cut' THEN 'crown' WHEN 'quarter cut' THEN 'quarter' WHEN 'rift cut' THEN 'rift' WHEN 'rotary cut' THEN 'rotary' ELSE '' END,
  `detail` = CASE WHEN lower(trim(substr(`detail`, instr(`detail`, ',') + 1))) IN ('crown cut', 'quarter cut', 'rift cut', 'rotary cut') THEN ''
    ELSE trim(substr(`detail`, instr(`detail`, ',') + 1)) END
WHERE `kind` = 'veneer' AND instr(`detail`, ',') > 0;
--> statement-breakpoint
UPDATE `finishes` SET
  `colour_ref` = upper(substr(`detail`, instr(`detail`, '#'), 7)),
  `detail` = rtrim(trim(replace(substr(`detail`, 1, instr(`detail`, '#') - 1), 'sRGB', '')), ', ')
WHERE `kind` = 'lacquer' AND `detail` GLOB '*#[0-9A-Fa-f][0-9A-Fa-f][0-9A-Fa-f][0-9A-Fa-f][0-9A-Fa-f][0-9A-Fa-f]*';
