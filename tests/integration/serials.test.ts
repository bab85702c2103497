import { execFile } from "node:child_process";
import { randomUUID } from "node:crypto";
import { fileURLToPath } from "node:url";
import { promisify } from "node:util";
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

const root = fileURLToPath(new URL("../../", import.meta.url));
/** A separate process drawing `count` serials one after another: real contention for the lock. */
async function drawInChild(count: number): Promise<string[]> {
  // An async wrapper: the eval'd text is a script, where top-level await is not allowed.
  const code = `(async () => {
    const { randomUUID } = await import("node:crypto");
    const { getDb } = await import("@/db");
    const { items } = await import("@/db/schema/genealogy");
    const { allocateSerial } = await import("@/lib/serials/allocator");
    const serials = [];
    for (let i = 0; i < ${count}; i++) {
      serials.push(await getDb().transaction(async (tx) => {
        const serial = await allocateSerial(tx, { kind: "cabinet", code: "PW2", year: 2026 });
        // Hold the lock a moment so the other processes pile up behind it.
        await new Promise((r) => setTimeout(r, 2));
        await tx.insert(items).values({ id: randomUUID(), kind: "cabinet", identity: serial, state: "in_stock" });
        return serial;
      }));
    }
    process.stdout.write(JSON.stringify(serials));
  })().catch((e) => { console.error(e); process.exit(1); });`;
  const { stdout } = await promisify(execFile)(`${root}node_modules/.bin/tsx`, ["--import", "./scripts/server-only.mjs", "-e", code], {
    cwd: root,
    env: process.env,
  });
  return JSON.parse(stdout) as string[];
}

const seqs = (serials: string[]) => serials.map((s) => parseSerial(s)!.seq).sort((a, b) => a - b);
const oneTo = (n: number) => Array.from({ length: n }, (_, i) => i + 1);

describe("allocateSerial", () => {
  test("5 processes drawing 10 serials each at once get 50 distinct serials numbered 1..50", async () => {
    const serials = (await Promise.all(Array.from({ length: 5 }, () => drawInChild(10)))).flat();
    expect(new Set(serials).size).toBe(50);
    expect(serials.every((s) => parseSerial(s)?.valid && s.startsWith("C-PW2-26-"))).toBe(true);
    expect(seqs(serials)).toEqual(oneTo(50));
    const stored = await getDb().select({ identity: items.identity }).from(items).where(eq(items.kind, "cabinet"));
    expect(stored.map((r) => r.identity).sort()).toEqual([...serials].sort());
  }, 60_000);

  // In one process db/index.ts makes write transactions take turns; between processes (above) the
  // busy timeout does: either way the upsert hands out each number once.
  test("50 transactions fired at once with Promise.all draw 50 distinct serials numbered 1..50 without a gap", async () => {
    const serials = await Promise.all(Array.from({ length: 50 }, () => allocateAndInsert("pair", "PW2", 2026)));
    expect(new Set(serials).size).toBe(50);
    const parsed = serials.map((s) => parseSerial(s));
    expect(parsed.every((p) => p?.valid && p.kind === "pair" && p.code === "PW2" && p.year === 2026)).toBe(true);
    expect(seqs(serials)).toEqual(oneTo(50));
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
    expect(await failureText(() => allocateSerial(getDb(), { kind: "drive_unit", code: "XX", year: 2030 }))).toMatch(/part type/);
    const rows = await getDb()
      .select()
      .from(serialSequences)
      .where(and(eq(serialSequences.kind, "drive_unit"), eq(serialSequences.year, 2030)));
    expect(rows).toEqual([]);
  });

  test("an item whose identity already exists is refused by the unique constraint", async () => {
    const serial = await allocateAndInsert("shipment", "DL01", 2026);
    expect(await failureText(() => insertItem(getDb(), "shipment", serial))).toMatch(/UNIQUE constraint failed: items\.identity/);
  });
});
