import Database from "libsql";
const path = "/tmp/twinleaf-bench-1rXYSN/register.db";
const db = new Database(path);
console.log(db.prepare("select count(*) n from sqlite_stat1").get());
const lot = (db.prepare("select id from items where identity like '%BULK'").get() as any).id;
const lib = `WITH RECURSIVE up(id, via, position, depth, link_id, started_at, ended_at) AS (
      SELECT ?, NULL, NULL, 0, NULL, NULL, NULL
      UNION ALL
      SELECT l.parent_id, l.child_id, l.position, up.depth + 1, l.id, l.started_at, l.ended_at
      FROM links l JOIN up ON l.child_id = up.id
      WHERE l.ended_at IS NULL AND up.depth < 24
    ),
    first AS (
      SELECT id, via, position, depth, link_id, started_at, ended_at,
             row_number() OVER (PARTITION BY id ORDER BY depth, started_at) AS rn
      FROM up
    )
    SELECT i.id, i.kind, i.identity, i.state, i.part_type, i.model_id, i.finish_id, i.dealer_id, i.attrs,
           first.via, first.position, first.depth, first.link_id, first.started_at, first.ended_at
    FROM first JOIN items i ON i.id = first.id
    WHERE first.rn = 1
    ORDER BY first.depth, i.kind, i.identity`;
console.log((db.prepare("EXPLAIN QUERY PLAN " + lib).all(lot) as any[]).map((r) => r.detail).join(" | "));
db.exec("DROP TABLE sqlite_stat1");
db.close();
const db2 = new Database(path);
console.log((db2.prepare("EXPLAIN QUERY PLAN " + lib).all(lot) as any[]).map((r) => r.detail).join(" | "));
