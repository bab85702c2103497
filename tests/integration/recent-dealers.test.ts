/** The register's front page lists the dealers of the latest shipments (lib/workshop/queries.ts, recentDealers). */
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { dealers as dealersTable, type Dealer } from "@/db/schema";
import { createItem } from "@/lib/genealogy/graph";
import { recentDealers } from "@/lib/workshop/queries";

const db = () => getDb();
let made: Dealer[];

async function ship(identity: string, dealer: Dealer | null, at: string) {
  await db().transaction((tx) => createItem(tx, { kind: "shipment", identity, state: "shipped", dealerId: dealer?.id ?? null }, { actorId: null, station: "packing", at: new Date(at) }));
}

beforeAll(async () => {
  made = await db()
    .insert(dealersTable)
    .values(["A", "B", "C", "D"].map((c) => ({ id: `d-${c}`, code: `RD-${c}`, name: `Dealer ${c}`, city: "Town", country: "GB", email: `${c.toLowerCase()}@dealer.test` })))
    .returning();
  const [a, b, c] = made;
  await ship("RD-S-1", a!, "2026-01-05T10:00:00Z");
  await ship("RD-S-2", b!, "2026-02-05T10:00:00Z");
  await ship("RD-S-3", a!, "2026-03-05T10:00:00Z");
  await ship("RD-S-4", c!, "2026-01-20T10:00:00Z");
  // A shipment with no dealer on record is left out.
  await ship("RD-S-5", null, "2026-04-01T10:00:00Z");
});

describe("recentDealers", () => {
  test("the dealers of the latest shipments, each once, the most recent first, with the day of its latest shipment", async () => {
    const { dealers, total } = await recentDealers(db(), 20);
    expect(dealers.map((d) => d.code)).toEqual(["RD-A", "RD-B", "RD-C"]);
    expect(dealers[0]!.lastShipped.toISOString()).toBe("2026-03-05T10:00:00.000Z");
    // Every dealer is counted, the one never shipped to as well.
    expect(total).toBe(4);
  });

  test("at most `limit` of them", async () => {
    expect((await recentDealers(db(), 2)).dealers.map((d) => d.code)).toEqual(["RD-A", "RD-B"]);
  });
});
