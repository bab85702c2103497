import { createClient } from "@libsql/client";
const c = createClient({ url: "file:/tmp/twinleaf-bench-uHbIDp/register.db" });
const t = async (s: string, a: any[] = [], label = s.slice(0,60).replace(/\s+/g," ")) => { const t0 = performance.now(); const r = await c.execute({ sql: s, args: a }); console.log((performance.now()-t0).toFixed(2), "ms", label, r.rows.length <= 30 ? JSON.stringify(r.rows.map(x=>x.detail ?? x)) : r.rows.length); return r; };
const lot = (await t("select id from items where identity like '%BULK'")).rows[0]!.id;
const q = (join: string) => `WITH RECURSIVE up(id, via, position, depth, link_id, started_at, ended_at) AS (
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
    FROM first ${join} items i ON i.id = first.id
    WHERE first.rn = 1
    ORDER BY first.depth, i.kind, i.identity`;
await t("EXPLAIN QUERY PLAN " + q("CROSS JOIN"), [lot]);
for (let k = 0; k < 5; k++) await t(q("CROSS JOIN"), [lot], "cross join");
for (let k = 0; k < 3; k++) await t(`WITH RECURSIVE up(id, depth) AS (SELECT ?, 0 UNION ALL SELECT l.parent_id, up.depth+1 FROM links l JOIN up ON l.child_id = up.id WHERE l.ended_at IS NULL AND up.depth < 24) SELECT count(*) FROM up`, [lot], "bare recursion");
