-- Drive-unit batches, the makers' lots they came from and flitches become register items that sit
-- in what was made from them (a lot in its batches, a batch in its units, a flitch in its leaves),
-- so a forward trace of any of them reaches every speaker and pair. A source sits in many parents.
DROP TRIGGER `links_shared_matches_kind`;
--> statement-breakpoint
CREATE TRIGGER `links_shared_matches_kind` BEFORE INSERT ON `links`
WHEN NEW.shared IS NOT ((SELECT kind FROM items WHERE id = NEW.child_id) IN ('component_lot', 'unit_batch', 'maker_lot', 'flitch'))
BEGIN
  SELECT RAISE(ABORT, 'links.shared must be true exactly when the child is a lot, a batch or a flitch');
END;
--> statement-breakpoint
-- One item a maker's lot (maker and lot trimmed, as lib/serials/lots.ts makerLotIdentity names it),
-- recorded by the first batch received from it. No new events: each item and link points at the
-- event that already recorded the fact (the batch received, the leaf cut).
INSERT INTO `items` (`id`, `kind`, `identity`, `part_type`, `state`, `attrs`, `created_at`, `created_event_id`)
SELECT lower(hex(randomblob(15))), 'maker_lot', ident, part_type, 'received', json_object('maker', maker, 'lot', lot), created_at, event_id
FROM (
  SELECT trim(b.maker) || ' lot ' || trim(b.lot) AS ident, trim(b.maker) AS maker, trim(b.lot) AS lot, b.part_type, b.created_at, b.event_id,
         row_number() OVER (PARTITION BY trim(b.maker) || ' lot ' || trim(b.lot) ORDER BY b.created_at, b.code) AS nth
  FROM `unit_batches` b
) WHERE nth = 1 AND ident NOT IN (SELECT identity FROM items);
--> statement-breakpoint
INSERT INTO `items` (`id`, `kind`, `identity`, `part_type`, `state`, `attrs`, `created_at`, `created_event_id`)
SELECT lower(hex(randomblob(15))), 'unit_batch', b.code, b.part_type, 'received',
       json_object('maker', b.maker, 'partNumber', b.part_number, 'lot', b.lot, 'receivedOn', b.received_on), b.created_at, b.event_id
FROM `unit_batches` b WHERE b.code NOT IN (SELECT identity FROM items);
--> statement-breakpoint
-- The lot sits in each batch from when the batch was received.
INSERT INTO `links` (`parent_id`, `child_id`, `position`, `parent_kind`, `parent_identity`, `shared`, `started_at`, `fit_event_id`)
SELECT bi.id, li.id, 'LOT', 'unit_batch', bi.identity, 1, b.created_at, b.event_id
FROM `unit_batches` b
JOIN `items` bi ON bi.identity = b.code AND bi.kind = 'unit_batch'
JOIN `items` li ON li.identity = trim(b.maker) || ' lot ' || trim(b.lot) AND li.kind = 'maker_lot'
WHERE NOT EXISTS (SELECT 1 FROM links l WHERE l.parent_id = bi.id AND l.child_id = li.id);
--> statement-breakpoint
-- A unit sits in its batch from when it was received (its own registration), whatever became of it since.
INSERT INTO `links` (`parent_id`, `child_id`, `position`, `parent_kind`, `parent_identity`, `shared`, `started_at`, `fit_event_id`)
SELECT u.id, bi.id, 'BATCH', u.kind, u.identity, 1, max(u.created_at, b.created_at), coalesce(u.created_event_id, b.event_id)
FROM `batch_units` bu
JOIN `items` u ON u.id = bu.item_id
JOIN `unit_batches` b ON b.id = bu.batch_id
JOIN `items` bi ON bi.identity = b.code AND bi.kind = 'unit_batch'
WHERE NOT EXISTS (SELECT 1 FROM links l WHERE l.parent_id = u.id AND l.child_id = bi.id);
--> statement-breakpoint
-- A flitch sits in each of its leaves from when the leaf was cut.
INSERT INTO `links` (`parent_id`, `child_id`, `position`, `parent_kind`, `parent_identity`, `shared`, `started_at`, `fit_event_id`)
SELECT lf.id, fl.id, 'FLITCH', lf.kind, lf.identity, 1, lf.created_at, coalesce(lf.created_event_id, f.event_id)
FROM `veneer_leaves` vl
JOIN `items` lf ON lf.id = vl.item_id
JOIN `items` fl ON fl.id = vl.flitch_id
JOIN `flitches` f ON f.item_id = vl.flitch_id
WHERE NOT EXISTS (SELECT 1 FROM links l WHERE l.parent_id = lf.id AND l.child_id = fl.id);
--> statement-breakpoint
-- The holdings index is derived from the open links: rebuilt whole, as migration 0007 built it.
DELETE FROM `holdings`;
--> statement-breakpoint
WITH RECURSIVE up(item_id, holder_id, holder_kind, holder_identity) AS (
  SELECT child_id, parent_id, parent_kind, parent_identity FROM links WHERE ended_at IS NULL
  UNION ALL
  SELECT up.item_id, l.parent_id, l.parent_kind, l.parent_identity
  FROM up JOIN links l ON l.child_id = up.holder_id AND l.ended_at IS NULL
)
INSERT INTO holdings (item_id, holder_id, holder_kind, holder_identity, paths)
SELECT item_id, holder_id, holder_kind, holder_identity, count(*) FROM up GROUP BY item_id, holder_id;
