-- Build the holdings of a register that already has links: every item with every holder above it
-- through open links, one row a path, counted.
WITH RECURSIVE up(item_id, holder_id, holder_kind, holder_identity) AS (
  SELECT child_id, parent_id, parent_kind, parent_identity FROM links WHERE ended_at IS NULL
  UNION ALL
  SELECT up.item_id, l.parent_id, l.parent_kind, l.parent_identity
  FROM up JOIN links l ON l.child_id = up.holder_id AND l.ended_at IS NULL
)
INSERT INTO holdings (item_id, holder_id, holder_kind, holder_identity, paths)
SELECT item_id, holder_id, holder_kind, holder_identity, count(*) FROM up GROUP BY item_id, holder_id;
