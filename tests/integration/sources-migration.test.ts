/**
 * Migration 0034 on a database written before batches, makers' lots and flitches were register
 * items: it makes their items, links each unit to its batch from its receipt and each leaf's flitch
 * from its cutting, rebuilds the holdings, and the forward trace then reaches speaker and pair.
 */
import { cpSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { sql } from "drizzle-orm";
import { migrate } from "drizzle-orm/libsql/migrator";
import { describe, expect, test } from "vitest";
import { openDb } from "@/db";
import { migrateDatabase, MIGRATIONS_FOLDER } from "@/db/migrate";
import { batchUnits, flitches, unitBatches, veneerLeaves } from "@/db/schema";
import { appendEvent } from "@/lib/events/queries";
import { affectedByItem } from "@/lib/containments/affected";
import { createItem, fit } from "@/lib/genealogy/graph";
import { traceForward } from "@/lib/genealogy/trace";

const LAST_BEFORE = "0033_case_reservations_history";

function migrationsUpTo(lastTag: string): string {
  const dir = mkdtempSync(join(tmpdir(), "twinleaf-mig-upto-"));
  cpSync(MIGRATIONS_FOLDER, dir, { recursive: true });
  const journalPath = join(dir, "meta", "_journal.json");
  const journal = JSON.parse(readFileSync(journalPath, "utf8")) as { entries: { tag: string }[] };
  const end = journal.entries.findIndex((e) => e.tag === lastTag);
  expect(end, `no migration ${lastTag}`).toBeGreaterThanOrEqual(0);
  journal.entries = journal.entries.slice(0, end + 1);
  writeFileSync(journalPath, JSON.stringify(journal));
  return dir;
}

describe("migrating a register written before batches and flitches were items", () => {
  test("items and honest links are made, and the forward trace reaches speakers and pairs", async () => {
    const url = `file:${join(mkdtempSync(join(tmpdir(), "twinleaf-mig-sources-")), "old.db")}`;
    const { client, db } = openDb(url);
    const received = new Date("2025-03-04T09:00:00Z");
    const cut = new Date("2025-03-05T10:00:00Z");
    const by = (at: Date) => ({ actorId: null, station: "seed" as const, at });
    let unitCreated = 0;
    let leafCreated = 0;
    try {
      await client.execute("PRAGMA journal_mode = WAL");
      await migrate(db, { migrationsFolder: migrationsUpTo(LAST_BEFORE) });
      // What the older version wrote: a batch with one unit, built into a speaker of a pair; a
      // flitch with one leaf on a cabinet of another pair. No source items, no source links.
      await db.transaction(async (tx) => {
        const eventId = await appendEvent(tx, { actorId: null, station: "lab", type: "batch.received", subjectKind: "batch", subjectId: "b1", data: {}, at: received });
        await tx.insert(unitBatches).values({ id: "b1", code: "TW-2503-01", partType: "tweeter", partNumber: "T-OLD", maker: "Old maker", lot: "OL-1", receivedOn: "2025-03-04", eventId, createdAt: received });
        const unit = await createItem(tx, { kind: "drive_unit", identity: "D-TW-25-00001-X", state: "fitted", partType: "tweeter" }, by(received));
        unitCreated = unit.createdAt.getTime();
        await tx.insert(batchUnits).values({ itemId: unit.id, batchId: "b1", makerSerial: "OLD-1" });
        const speaker = await createItem(tx, { kind: "speaker", identity: "S-OLD-1", state: "built" }, by(received));
        const pair = await createItem(tx, { kind: "pair", identity: "P-OLD-1", state: "built" }, by(received));
        await fit(tx, { parent: speaker, child: unit, position: "T" }, by(new Date("2025-04-01T09:00:00Z")));
        await fit(tx, { parent: pair, child: speaker, position: "L" }, by(new Date("2025-04-01T09:00:00Z")));

        // Raw SQL: the schema of today names columns (a finish's botanical name, cut…) the old database lacks.
        await tx.run(sql`INSERT INTO finishes (id, code, name, kind) VALUES ('f1', 'WN', 'Invented walnut', 'veneer')`);
        const flitch = await createItem(tx, { kind: "flitch", identity: "F-WN-25-00001-X", state: "received" }, by(cut));
        const fEvent = await appendEvent(tx, { actorId: null, station: "veneer", type: "flitch.received", subjectKind: "item", subjectId: flitch.id, data: {}, at: cut });
        await tx.insert(flitches).values({ itemId: flitch.id, finishId: "f1", logReference: "R", supplier: "S", receivedOn: "2025-03-05", leafThicknessMm: 0.6, leafCount: 1, eventId: fEvent });
        const leaf = await createItem(tx, { kind: "leaf", identity: "F-WN-25-00001-X/01", state: "used" }, by(cut));
        leafCreated = leaf.createdAt.getTime();
        await tx.insert(veneerLeaves).values({ itemId: leaf.id, flitchId: flitch.id, seq: 1 });
        const cabinet = await createItem(tx, { kind: "cabinet", identity: "C-OLD-1", state: "in_route" }, by(cut));
        const pair2 = await createItem(tx, { kind: "pair", identity: "P-OLD-2", state: "in_route" }, by(cut));
        await fit(tx, { parent: cabinet, child: leaf, position: "F1" }, by(new Date("2025-03-06T09:00:00Z")));
        await fit(tx, { parent: pair2, child: cabinet, position: "CAB-L" }, by(new Date("2025-03-06T09:00:00Z")));
      });
      const eventsBefore = (await db.all<{ n: number }>(sql`SELECT count(*) AS n FROM events`))[0]!.n;
      client.close();
      await migrateDatabase(url);
      const after = openDb(url);
      try {
        const item = async (identity: string) => (await after.db.all<{ id: string; kind: string; created_at: number }>(sql`SELECT id, kind, created_at FROM items WHERE identity = ${identity}`))[0]!;
        const batch = await item("TW-2503-01");
        const lot = await item("Old maker lot OL-1");
        expect([batch.kind, lot.kind]).toEqual(["unit_batch", "maker_lot"]);
        // No event was written behind the chain: items and links point at the events already there.
        expect((await after.db.all<{ n: number }>(sql`SELECT count(*) AS n FROM events`))[0]!.n).toBe(eventsBefore);
        const unitLink = (await after.db.all<{ started_at: number; shared: number }>(sql`SELECT started_at, shared FROM links WHERE child_id = ${batch.id} AND ended_at IS NULL`))[0]!;
        expect(unitLink).toEqual({ started_at: unitCreated, shared: 1 });
        const flitch = await item("F-WN-25-00001-X");
        const leafLink = (await after.db.all<{ started_at: number }>(sql`SELECT started_at FROM links WHERE child_id = ${flitch.id}`))[0]!;
        expect(leafLink.started_at).toBe(leafCreated);

        for (const [root, expected] of [[batch.id, ["S-OLD-1", "P-OLD-1"]], [lot.id, ["TW-2503-01", "S-OLD-1", "P-OLD-1"]], [flitch.id, ["F-WN-25-00001-X/01", "C-OLD-1", "P-OLD-2"]]] as const) {
          const now = (await traceForward(after.db, root)).map((h) => h.identity);
          const ever = (await traceForward(after.db, root, { mode: "ever" })).map((h) => h.identity);
          expect(now).toEqual(expect.arrayContaining([...expected]));
          expect(ever.sort()).toEqual([...now].sort());
        }
        expect((await affectedByItem(after.db, lot.id)).filter((a) => a.kind === "pair" || a.kind === "speaker").map((a) => a.identity)).toEqual(["P-OLD-1", "S-OLD-1"]);
        expect((await affectedByItem(after.db, flitch.id)).filter((a) => a.kind === "pair" || a.kind === "speaker").map((a) => a.identity)).toEqual(["P-OLD-2"]);
        // A second run of the migrations changes nothing.
        const links = (await after.db.all<{ n: number }>(sql`SELECT count(*) AS n FROM links`))[0]!.n;
        after.client.close();
        await migrateDatabase(url);
        const again = openDb(url);
        expect((await again.db.all<{ n: number }>(sql`SELECT count(*) AS n FROM links`))[0]!.n).toBe(links);
        again.client.close();
      } finally {
        after.client.close();
      }
    } finally {
      client.close();
    }
  });
});
