import { randomUUID } from "node:crypto";
import { and, eq } from "drizzle-orm";
import { describe, expect, test } from "vitest";
import { getDb, type DbOrTx } from "@/db";
import { items, serialSequences } from "@/db/schema/genealogy";
import { allocateSerial } from "@/lib/serials/allocator";
import { parseSerial, type SerialKind } from "@/lib/serials/format";
import { failureText } from "./helpers";

async function insertItem(tx: DbOrTx, kind: SerialKind, identity: string) {
  await tx.insert(items).values({ id: randomUUID(), kind, identity, state: "in_stock" });
}

/** Allocates and inserts one item in its own transaction, as the register's writes do. */
const allocateAndInsert = (kind: SerialKind, code: string, year: number) =>
  getDb().transaction(async (tx) => {
    const serial = await allocateSerial(tx, { kind, code, year });
    await insertItem(tx, kind, serial);
    return serial;
  });

describe("allocateSerial", () => {
  test("50 concurrent transactions draw 50 distinct serials numbered 1..50 without a gap", async () => {
    const serials = await Promise.all(Array.from({ length: 50 }, () => allocateAndInsert("pair", "PW2", 2026)));
    expect(new Set(serials).size).toBe(50);
    const parsed = serials.map((s) => parseSerial(s));
    expect(parsed.every((p) => p?.valid && p.kind === "pair" && p.code === "PW2" && p.year === 2026)).toBe(true);
    expect(parsed.map((p) => p!.seq).sort((a, b) => a - b)).toEqual(Array.from({ length: 50 }, (_, i) => i + 1));
    const stored = await getDb().select({ identity: items.identity }).from(items).where(eq(items.kind, "pair"));
    expect(stored.map((r) => r.identity).sort()).toEqual([...serials].sort());
    const [seqRow] = await getDb()
      .select()
      .from(serialSequences)
      .where(and(eq(serialSequences.kind, "pair"), eq(serialSequences.year, 2026)));
    expect(seqRow?.last).toBe(50);
  });

  test.each<[string, SerialKind, string, number]>([
    ["another year of the same kind", "pair", "PW2", 2027],
    ["another kind in the same year", "carton", "PW2", 2026],
    ["a drive unit (part-type code)", "drive_unit", "TW", 2026],
  ])("%s starts its own sequence at 1", async (_label, kind, code, year) => {
    const first = await allocateAndInsert(kind, code, year);
    const second = await allocateAndInsert(kind, code, year);
    expect([parseSerial(first)?.seq, parseSerial(second)?.seq]).toEqual([1, 2]);
  });

  test("the sequence is per kind and year, not per code", async () => {
    const a = await allocateAndInsert("speaker", "PW2", 2026);
    const b = await allocateAndInsert("speaker", "XB3", 2026);
    expect([parseSerial(a)?.seq, parseSerial(b)?.seq]).toEqual([1, 2]);
  });

  test("a rolled-back transaction returns its number to the sequence", async () => {
    const failed = await failureText(() =>
      getDb().transaction(async (tx) => {
        await allocateSerial(tx, { kind: "crossover", code: "PW2", year: 2026 });
        throw new Error("insert failed later");
      }),
    );
    expect(failed).toMatch(/insert failed later/);
    expect(parseSerial(await allocateAndInsert("crossover", "PW2", 2026))?.seq).toBe(1);
  });

  test("a bad code is refused before a number is taken", async () => {
    expect(await failureText(() => allocateSerial(getDb(), { kind: "drive_unit", code: "XX", year: 2026 }))).toMatch(/part type/);
    const rows = await getDb().select().from(serialSequences).where(eq(serialSequences.kind, "drive_unit"));
    expect(rows.every((r) => r.year !== 2026 || r.last === 2)).toBe(true);
  });

  test("an item whose identity already exists is refused by the unique constraint", async () => {
    const serial = await allocateAndInsert("shipment", "DL01", 2026);
    expect(await failureText(() => insertItem(getDb(), "shipment", serial))).toMatch(/UNIQUE constraint failed: items\.identity/);
  });
});
