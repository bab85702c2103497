import "server-only";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import type { Item } from "@/db/schema";

/**
 * The pairs (part below, holder above) that a link between `parent` and `child` joins: the child
 * and everything it holds, times the parent and everything holding it, each with its number of
 * paths. Read from `holdings` itself, which is exact for the open links.
 */
const product = (parent: Item, child: Item) => sql`
  below(item_id, paths) AS (
    SELECT ${child.id}, 1
    UNION ALL SELECT item_id, paths FROM holdings WHERE holder_id = ${child.id}
  ),
  above(holder_id, holder_kind, holder_identity, paths) AS (
    SELECT ${parent.id}, ${parent.kind}, ${parent.identity}, 1
    UNION ALL SELECT holder_id, holder_kind, holder_identity, paths FROM holdings WHERE item_id = ${parent.id}
  ),
  joined(item_id, holder_id, holder_kind, holder_identity, paths) AS (
    SELECT below.item_id, above.holder_id, above.holder_kind, above.holder_identity, below.paths * above.paths FROM below, above
  )`;

/** After a link is opened: every part below now has the holders above, by that many more paths. */
export async function addHoldings(tx: DbOrTx, parent: Item, child: Item): Promise<void> {
  await tx.run(sql`
    WITH ${product(parent, child)}
    INSERT INTO holdings (item_id, holder_id, holder_kind, holder_identity, paths)
    SELECT item_id, holder_id, holder_kind, holder_identity, paths FROM joined WHERE true
    ON CONFLICT (item_id, holder_id) DO UPDATE SET paths = paths + excluded.paths`);
}

/** After a link is ended: the same pairs lose those paths, and a pair with none left goes. */
export async function removeHoldings(tx: DbOrTx, parent: Item, child: Item): Promise<void> {
  await tx.run(sql`
    WITH ${product(parent, child)}
    UPDATE holdings SET paths = paths - (SELECT j.paths FROM joined j WHERE j.item_id = holdings.item_id AND j.holder_id = holdings.holder_id)
    WHERE (item_id, holder_id) IN (SELECT item_id, holder_id FROM joined)`);
  await tx.run(sql`DELETE FROM holdings WHERE paths = 0`);
}
