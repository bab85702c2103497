import { cpSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { sql } from "drizzle-orm";
import { migrate } from "drizzle-orm/libsql/migrator";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb, openDb, type DbOrTx } from "@/db";
import { dealers, items, owners } from "@/db/schema";
import { migrateDatabase, MIGRATIONS_FOLDER } from "@/db/migrate";
import { appendEvent } from "@/lib/events/queries";
import { createItem } from "@/lib/genealogy/graph";
import type { Permission } from "@/lib/auth/permissions";
import { search, type SearchAnswer, type SearchHit } from "@/lib/search/search";
import { compactText } from "@/lib/search/text";
import { formatSerial, type SerialKind } from "@/lib/serials";
import { prng } from "../../bench/register";

const by = { actorId: null, station: "admin" as const };
const serviceDesk = { permissions: new Set<Permission>(["register.read", "service.work"]) };

/** Every hit of an answer, as the text a person would read first. */
const titles = (a: SearchAnswer) =>
  [a.exact, ...a.didYouMean, ...a.fuzzy].flatMap((h: SearchHit | null) =>
    !h ? [] : [h.type === "item" ? h.identity : h.type === "case" || h.type === "containment" ? h.code : h.name],
  );

/** Index rows of one source whose text holds `fragment`, with no candidate limit. */
async function indexed(db: DbOrTx, fragment: string, source = "item"): Promise<Set<string>> {
  const rows = await db.all<{ ref: string }>(sql`
    SELECT k.ref FROM search_text t CROSS JOIN search_keys k ON k.id = t.rowid
    WHERE search_text MATCH ${`"${compactText(fragment)}"`} AND k.source = ${source}`);
  return new Set(rows.map((r) => r.ref));
}

const rng = prng(16_2026);
const KINDS: SerialKind[] = ["pair", "speaker", "cabinet", "crossover", "carton", "flitch", "drive_unit"];
const randomIdentities: string[] = [];

beforeAll(async () => {
  // A few thousand items of the register's real shapes: serials with their check characters,
  // veneer leaves (kept out of the index), lots and batch codes.
  const rows: (typeof items.$inferInsert)[] = [];
  const seen = new Set<string>();
  for (let i = 0; rows.length < 3000; i++) {
    const pick = rng.int(10);
    let kind: string;
    let identity: string;
    let attrs: Record<string, unknown> = {};
    if (pick < 7) {
      const k = KINDS[pick]!;
      kind = k;
      const code = k === "drive_unit" ? rng.pick(["TW", "MR", "BS"]) : rng.pick(["PW2", "SL4", "MN3", "OAK"]);
      identity = formatSerial({ kind: k, code, year: 2010 + rng.int(17), seq: 1 + rng.int(99_999) });
    } else if (pick === 7) {
      kind = "leaf";
      identity = `${formatSerial({ kind: "flitch", code: "OAK", year: 2020 + rng.int(7), seq: 1 + rng.int(9_999) })}/${String(1 + rng.int(32)).padStart(2, "0")}`;
    } else if (pick === 8) {
      kind = "component_lot";
      const lot = `L${rng.int(100_000)}`;
      identity = `LOT-${rng.pick(["CAP", "IND", "RES"])}-${2000 + rng.int(9999)}-${lot}`;
      attrs = { lot };
    } else {
      kind = "unit_batch";
      identity = `${rng.pick(["TW", "MR", "BS"])}-${2000 + rng.int(999)}-${String(1 + rng.int(99)).padStart(2, "0")}`;
      attrs = { lot: `M${rng.int(1_000_000)}` };
    }
    if (seen.has(identity)) continue;
    seen.add(identity);
    rows.push({ id: `rnd-${i}`, kind: kind as never, identity, state: "fitted", attrs });
  }
  const db = getDb();
  for (let i = 0; i < rows.length; i += 500) await db.insert(items).values(rows.slice(i, i + 500));
  randomIdentities.push(...rows.map((r) => r.identity));
});

describe("the index against a plain LIKE scan", () => {
  test("fragments of 3 to 8 characters find exactly the items whose identity (or lot) holds them", async () => {
    const db = getDb();
    for (let n = 0; n < 120; n++) {
      const source = compactText(rng.pick(randomIdentities));
      const len = 3 + rng.int(6);
      const start = rng.int(Math.max(1, source.length - len + 1));
      const fragment = source.slice(start, start + len);
      // The same text the triggers store, scanned row by row: the reference the index must equal.
      const scanned = await db.all<{ id: string }>(sql`
        SELECT id FROM items WHERE kind <> 'leaf' AND (
          replace(replace(identity, '-', ''), '/', '') LIKE ${`%${fragment}%`}
          OR (kind IN ('component_lot', 'unit_batch') AND json_extract(attrs, '$.lot') LIKE ${`%${fragment}%`}))`);
      expect([...(await indexed(db, fragment))].sort(), `fragment ${fragment}`).toEqual(scanned.map((r) => r.id).sort());
      // Through the search box, a fragment with few hits lists every one of them.
      if (scanned.length > 0 && scanned.length <= 8) {
        const answer = await search(db, fragment, 20);
        const ids = new Set([answer.exact, ...answer.didYouMean, ...answer.fuzzy].map((h) => h?.id));
        for (const { id } of scanned) expect(ids, `fragment ${fragment}`).toContain(id);
      }
    }
  });

  test("every exact serial is found, and no leaf is indexed", async () => {
    const db = getDb();
    for (const identity of randomIdentities) {
      const answer = await search(db, identity, 0);
      expect(answer.exact?.type === "item" && answer.exact.identity, identity).toBe(identity);
    }
    const leaves = await db.all<{ n: number }>(sql`SELECT count(*) AS n FROM search_keys k JOIN items i ON i.id = k.ref WHERE k.source = 'item' AND i.kind = 'leaf'`);
    expect(leaves[0]!.n).toBe(0);
  });
});

describe("the index moves with the write that changes its source", () => {
  test("an item created in a transaction is found; a rolled-back one leaves no index row", async () => {
    const db = getDb();
    await db.transaction((tx) => createItem(tx, { kind: "component_lot", identity: "LOT-WAX-7781-Q", state: "in_stock", partType: "capacitor" }, by));
    expect(titles(await search(db, "wax 7781"))).toContain("LOT-WAX-7781-Q");

    await expect(
      db.transaction(async (tx) => {
        await createItem(tx, { kind: "component_lot", identity: "LOT-ROLLED-BACK-1", state: "in_stock", partType: "capacitor" }, by);
        throw new Error("changed my mind");
      }),
    ).rejects.toThrow("changed my mind");
    expect(await indexed(db, "ROLLEDBACK")).toEqual(new Set());
    const orphans = await db.all<{ n: number }>(sql`
      SELECT count(*) AS n FROM search_keys k WHERE k.source = 'item' AND NOT EXISTS (SELECT 1 FROM items i WHERE i.id = k.ref)`);
    expect(orphans[0]!.n).toBe(0);
    expect(titles(await search(db, "rolled back"))).toEqual([]);
  });

  test("a dealer renamed is found by the new name only; a dealer deleted is found no more", async () => {
    const db = getDb();
    await db.insert(dealers).values({ id: "d-rename", code: "RNM", name: "Brackwater Sound Loft", city: "Estervale", country: "GB", email: "a@brackwater.test" });
    expect(titles(await search(db, "brackwater"))).toContain("Brackwater Sound Loft");
    await db.transaction(async (tx) => {
      await tx.update(dealers).set({ name: "Ferncastle Listening" }).where(sql`id = 'd-rename'`);
    });
    expect(titles(await search(db, "brackwater"))).toEqual([]);
    expect(titles(await search(db, "ferncastle"))).toEqual(["Ferncastle Listening"]);
    await db.delete(dealers).where(sql`id = 'd-rename'`);
    expect(titles(await search(db, "ferncastle"))).toEqual([]);
    const rows = await db.all<{ n: number }>(sql`SELECT count(*) AS n FROM search_keys WHERE source = 'dealer' AND ref = 'd-rename'`);
    expect(rows[0]!.n).toBe(0);
  });
});

describe("each kind of thing is found by a fragment and by its whole text", () => {
  beforeAll(async () => {
    const db = getDb();
    await db.run(sql`INSERT INTO users (id, email, name) VALUES ('u-q', 'quality@search.test', 'Quality Person')`);
    await db.insert(owners).values({ id: "o-s", name: "Idunn Achterberg", email: "idunn.a@owners.test", town: "Morrowby", country: "NO" });
    await db.insert(dealers).values({ id: "d-s", code: "LKW", name: "Larkwell Audio House", city: "Pennick", country: "GB", email: "shop@larkwell.test" });
    await db.transaction(async (tx) => {
      const ev = await appendEvent(tx, { actorId: null, station: "admin", type: "item.created", subjectKind: "item", subjectId: "x", data: {} });
      const flitch = await createItem(tx, { kind: "flitch", identity: formatSerial({ kind: "flitch", code: "OAK", year: 2026, seq: 777 }), state: "cut" }, by);
      await tx.run(sql`INSERT INTO finishes (id, code, name, kind) VALUES ('f-s', 'WLN', 'Walnut', 'veneer')`);
      await tx.run(sql`INSERT INTO flitches (item_id, finish_id, log_reference, supplier, received_on, leaf_thickness_mm, leaf_count, event_id)
                       VALUES (${flitch.id}, 'f-s', 'LOG-QV-88231', 'Timber yard', '2026-03-02', 0.6, 32, ${ev})`);
      await tx.run(sql`INSERT INTO unit_batches (id, code, part_type, part_number, maker, lot, received_on, event_id)
                       VALUES ('b-s', 'TW-2603-01', 'tweeter', 'T-100', 'Invented Drivers', 'ZK-44190', '2026-03-03', ${ev})`);
      await createItem(tx, { kind: "maker_lot", identity: "Invented Drivers lot ZK-44190", state: "received", partType: "tweeter", attrs: { maker: "Invented Drivers", lot: "ZK-44190" } }, by);
      await createItem(tx, { kind: "unit_batch", identity: "TW-2603-01", state: "received", partType: "tweeter", attrs: { lot: "ZK-44190" } }, by);
      const unit = await createItem(tx, { kind: "drive_unit", identity: formatSerial({ kind: "drive_unit", code: "TW", year: 2026, seq: 9191 }), state: "in_stock", partType: "tweeter" }, by);
      await tx.run(sql`INSERT INTO batch_units (item_id, batch_id, maker_serial) VALUES (${unit.id}, 'b-s', 'MKR7731904')`);
      await createItem(tx, { kind: "supplier_lot", identity: "SUP-BRASS-0412", state: "received", attrs: { lot: "BR0412X" } }, by);
      const shipment = await createItem(tx, { kind: "shipment", identity: formatSerial({ kind: "shipment", code: "LKW", year: 2026, seq: 31 }), state: "shipped" }, by);
      await tx.run(sql`INSERT INTO shipment_details (item_id, dealer_id, shipped_on, carrier, tracking, event_id)
                       VALUES (${shipment.id}, 'd-s', '2026-04-01', 'Carrier', '1Z77A0349154820', ${ev})`);
      const pair = await createItem(tx, { kind: "pair", identity: formatSerial({ kind: "pair", code: "PW2", year: 2026, seq: 4321 }), state: "shipped" }, by);
      await tx.run(sql`INSERT INTO service_cases (id, code, item_id, pair_id, returned_by, received_on, symptom, opened_at, event_id)
                       VALUES ('c-s', 'RT2604-0031', ${pair.id}, ${pair.id}, 'owner', '2026-04-20', 'Buzz on the left tweeter', 1, ${ev})`);
      await tx.run(sql`INSERT INTO containments (id, code, target_item_id, target_label, reason, severity, raised_at, raised_by, event_id)
                       VALUES ('k-s', 'CN2604-0007', ${unit.id}, 'TW-2603-01', 'Suspect voice coils', 'major', 1, 'u-q', ${ev})`);
    });
  });

  // Whole texts as they were registered above; fragments cut from them with separators as people type them.
  test.each([
    ["a flitch serial", formatSerial({ kind: "flitch", code: "OAK", year: 2026, seq: 777 }), "OAK-26-0077", formatSerial({ kind: "flitch", code: "OAK", year: 2026, seq: 777 })],
    ["a flitch by its log reference", "LOG-QV-88231", "qv 882", formatSerial({ kind: "flitch", code: "OAK", year: 2026, seq: 777 })],
    ["a drive unit by its maker's serial", "MKR7731904", "7731", formatSerial({ kind: "drive_unit", code: "TW", year: 2026, seq: 9191 })],
    ["a maker's lot by its lot code", "Invented Drivers lot ZK-44190", "zk-4419", "Invented Drivers lot ZK-44190"],
    ["a drive-unit batch by its batch code", "TW-2603-01", "2603-0", "TW-2603-01"],
    ["a supplier's lot by its lot code", "SUP-BRASS-0412", "br0412", "SUP-BRASS-0412"],
    ["a shipment by its tracking number", "1Z77A0349154820", "034915", formatSerial({ kind: "shipment", code: "LKW", year: 2026, seq: 31 })],
    ["a service case by its code", "RT2604-0031", "2604-003", "RT2604-0031"],
    ["a containment by its code", "CN2604-0007", "cn2604", "CN2604-0007"],
    ["a dealer by name", "Larkwell Audio House", "kwell aud", "Larkwell Audio House"],
    ["a dealer by code", "LKW", "LKW", "Larkwell Audio House"],
    ["a dealer by city", "Pennick", "ennic", "Larkwell Audio House"],
    ["an owner by name", "Idunn Achterberg", "achter", "Idunn Achterberg"],
    ["an owner by e-mail", "idunn.a@owners.test", "idunn.a@", "Idunn Achterberg"],
    ["an owner by town", "Morrowby", "orrowb", "Idunn Achterberg"],
  ])("%s", async (_label, whole, fragment, expected) => {
    for (const text of [whole, fragment]) {
      expect(titles(await search(getDb(), text, 10, serviceDesk)), text).toContain(expected);
    }
  });

  test("a service case is not offered to someone who may not open it", async () => {
    const workshop = { permissions: new Set<Permission>(["register.read", "cabinet.work"]) };
    expect(titles(await search(getDb(), "RT2604-0031", 10, workshop))).toEqual([]);
    expect(titles(await search(getDb(), "RT2604-0031", 10, serviceDesk))).toEqual(["RT2604-0031"]);
  });

  test("an item found by another text says by what", async () => {
    const answer = await search(getDb(), "1Z77A03491", 10);
    expect(answer.fuzzy[0]).toMatchObject({ type: "item", kind: "shipment", via: { by: "tracking", text: "1Z77A0349154820" } });
  });
});

describe("the migration fills the index for an existing database", () => {
  test("rows written before the index existed are found once it is applied", async () => {
    const dir = mkdtempSync(join(tmpdir(), "twinleaf-search-mig-"));
    // The committed migrations cut just before the search index's own.
    const before = join(dir, "migrations");
    cpSync(MIGRATIONS_FOLDER, before, { recursive: true });
    const journalPath = join(before, "meta", "_journal.json");
    const journal = JSON.parse(readFileSync(journalPath, "utf8")) as { entries: { tag: string }[] };
    const cut = journal.entries.findIndex((e) => e.tag.endsWith("_search_index"));
    expect(cut).toBeGreaterThan(0);
    writeFileSync(journalPath, JSON.stringify({ ...journal, entries: journal.entries.slice(0, cut) }));

    const url = `file:${join(dir, "old.db")}`;
    const old = openDb(url);
    try {
      await migrate(old.db, { migrationsFolder: before });
      expect((await old.client.execute("SELECT count(*) AS n FROM sqlite_master WHERE name = 'search_text'")).rows[0]!.n).toBe(0);
      await old.db.insert(items).values([
        { id: "old-1", kind: "pair", identity: formatSerial({ kind: "pair", code: "PW2", year: 2019, seq: 808 }), state: "shipped" },
        { id: "old-2", kind: "component_lot", identity: "LOT-OLD-5150-B", state: "in_stock" },
        { id: "old-3", kind: "leaf", identity: `${formatSerial({ kind: "flitch", code: "OAK", year: 2019, seq: 5 })}/03`, state: "fitted" },
      ]);
      await old.db.insert(dealers).values({ id: "old-d", code: "OLD", name: "Saltmarsh Hi-Fi", city: "Wexley", country: "GB", email: "s@saltmarsh.test" });
      await old.db.insert(owners).values({ id: "old-o", name: "Tobiah Rennard", town: "Colbeck", country: "GB" });
    } finally {
      old.client.close();
    }

    await migrateDatabase(url);
    const now = openDb(url);
    try {
      expect(titles(await search(now.db, "5150"))).toEqual(["LOT-OLD-5150-B"]);
      expect(titles(await search(now.db, "PW2-19-0080"))).toContain(formatSerial({ kind: "pair", code: "PW2", year: 2019, seq: 808 }));
      expect(titles(await search(now.db, "saltmarsh"))).toEqual(["Saltmarsh Hi-Fi"]);
      expect(titles(await search(now.db, "rennard"))).toEqual(["Tobiah Rennard"]);
      const keys = await now.db.all<{ source: string; n: number }>(sql`SELECT source, count(*) AS n FROM search_keys GROUP BY source ORDER BY source`);
      // Two items (the leaf is left out), one dealer, one owner.
      expect(keys).toEqual([{ source: "dealer", n: 1 }, { source: "item", n: 2 }, { source: "owner", n: 1 }]);
    } finally {
      now.client.close();
    }
  });
});
