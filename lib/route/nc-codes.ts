import "server-only";
import { like, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { nonconformances } from "@/db/schema";
import { workshopDay } from "@/lib/workshop-time";

/**
 * The next nonconformance code, "NC-2612-004": the year and month of the workshop's calendar and a
 * count within the month. One rule for the route's and the final test's nonconformances; call it
 * inside the transaction that opens one (the code is unique in the schema).
 */
export async function nextNcCode(tx: DbOrTx, at: Date): Promise<string> {
  const day = workshopDay(at);
  const prefix = `NC-${day.slice(2, 4)}${day.slice(5, 7)}-`;
  const [row] = await tx.select({ n: sql<number>`count(*)` }).from(nonconformances).where(like(nonconformances.code, `${prefix}%`));
  return `${prefix}${String(Number(row?.n ?? 0) + 1).padStart(3, "0")}`;
}
