import "server-only";
import { eq, inArray, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { dealers, finishes, items, models, owners, ownerships } from "@/db/schema";
import { currentParent, currentParentCount, shippedAt } from "./trace";

/** Items with what names them (model, finish, dealer), in one query: what a label prints. */
export function itemsWithNames(db: DbOrTx, identities: string[]) {
  return db
    .select({ item: items, model: models, finish: finishes, dealer: dealers })
    .from(items)
    .leftJoin(models, eq(models.id, items.modelId))
    .leftJoin(finishes, eq(finishes.id, items.finishId))
    .leftJoin(dealers, eq(dealers.id, items.dealerId))
    .where(inArray(items.identity, identities));
}

export type ItemWithNames = Awaited<ReturnType<typeof itemsWithNames>>[number];

/** An item with what names it, where it sits now and when it shipped. */
export async function itemDetails(db: DbOrTx, identity: string, options: { parents?: number } = {}) {
  const [row] = await itemsWithNames(db, [identity]);
  if (!row) return null;
  // A lot has thousands of holders: a page that shows a few asks for a few, and for the count.
  const [parents, parentCount, shipped] = await Promise.all([
    currentParent(db, row.item.id, options.parents),
    currentParentCount(db, row.item.id),
    shippedAt(db, row.item.id),
  ]);
  return { ...row, parents, parentCount, shippedAt: shipped };
}

export type ItemDetails = NonNullable<Awaited<ReturnType<typeof itemDetails>>>;

/** A dealer and every shipment sent to them, with how many cartons each held. */
export async function dealerWithShipments(db: DbOrTx, code: string) {
  const [dealer] = await db.select().from(dealers).where(eq(dealers.code, code)).limit(1);
  if (!dealer) return null;
  const shipments = await db.all<{ id: string; identity: string; state: string; created_at: number; cartons: number }>(sql`
    SELECT s.id, s.identity, s.state, s.created_at,
           (SELECT count(*) FROM links l WHERE l.parent_id = s.id AND l.ended_at IS NULL) AS cartons
    FROM items s WHERE s.kind = 'shipment' AND s.dealer_id = ${dealer.id}
    ORDER BY s.created_at DESC`);
  return { dealer, shipments: shipments.map((s) => ({ ...s, createdAt: new Date(Number(s.created_at)), cartons: Number(s.cartons) })) };
}

/** An owner and what they have been registered as holding. */
export async function ownerWithItems(db: DbOrTx, id: string) {
  const [owner] = await db.select().from(owners).where(eq(owners.id, id)).limit(1);
  if (!owner) return null;
  const held = await db
    .select({ identity: items.identity, kind: items.kind, state: items.state, since: ownerships.since })
    .from(ownerships)
    .innerJoin(items, eq(items.id, ownerships.itemId))
    .where(eq(ownerships.ownerId, id))
    .orderBy(ownerships.since);
  return { owner, held };
}

/** The newest pairs with their model and finish, for the register's front page. */
export async function recentPairs(db: DbOrTx, limit = 100) {
  return db
    .select({ id: items.id, identity: items.identity, state: items.state, createdAt: items.createdAt, model: models.name, finish: finishes.name })
    .from(items)
    .leftJoin(models, eq(models.id, items.modelId))
    .leftJoin(finishes, eq(finishes.id, items.finishId))
    .where(eq(items.kind, "pair"))
    .orderBy(sql`${items.createdAt} DESC`)
    .limit(limit);
}

/** The dealers that shipments went to: the last step of a forward trace. */
export async function dealersOf(db: DbOrTx, shipmentIds: string[]) {
  if (shipmentIds.length === 0) return [];
  return db.all<{ id: string; code: string; name: string; city: string; country: string; shipments: number }>(sql`
    SELECT d.id, d.code, d.name, d.city, d.country, count(*) AS shipments
    FROM items s JOIN dealers d ON d.id = s.dealer_id
    WHERE s.id IN (SELECT value FROM json_each(${JSON.stringify(shipmentIds)}))
    GROUP BY d.id ORDER BY d.name`);
}
