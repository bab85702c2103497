import "server-only";
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { dealers, finishes, items, models } from "@/db/schema";
import { currentParent, shippedAt } from "./trace";

/** An item with what names it: model, finish, dealer, where it sits now and when it shipped. */
export async function itemDetails(db: DbOrTx, identity: string) {
  const [row] = await db
    .select({ item: items, model: models, finish: finishes, dealer: dealers })
    .from(items)
    .leftJoin(models, eq(models.id, items.modelId))
    .leftJoin(finishes, eq(finishes.id, items.finishId))
    .leftJoin(dealers, eq(dealers.id, items.dealerId))
    .where(eq(items.identity, identity))
    .limit(1);
  if (!row) return null;
  const [parents, shipped] = await Promise.all([currentParent(db, row.item.id), shippedAt(db, row.item.id)]);
  return { ...row, parents, shippedAt: shipped };
}

export type ItemDetails = NonNullable<Awaited<ReturnType<typeof itemDetails>>>;
