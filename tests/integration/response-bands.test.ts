/**
 * Band levels kept with each drive unit's response (lib/lab/response-bands): what is kept is what
 * the acoustics library works out from the stored points, readiness gives the same answers from
 * the kept levels as from the points, and a database with responses but no kept levels is filled.
 */
import { eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { responseBands, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { bandLevels, thirdOctaveBands } from "@/lib/acoustics";
import { batchUnitsView, importResponseFiles, listBatches, matchReadinessOf, registerBatch } from "@/lib/lab/units";
import { fillBandLevels } from "@/lib/lab/response-bands";
import type { LabActor } from "@/lib/vocabulary/actor";
import type { PartType } from "@/lib/vocabulary/part-types";

const db = () => getDb();
let actor: LabActor;

/** A made-up response: `level` dB plus `tilt` dB per octave and a small ripple, from `fromHz` to 20 kHz, 1/12 octave apart. */
function responseFile(serial: string, level: number, tilt: number, fromHz: number): string {
  const lines = [`* ${serial}`, "Freq(Hz) SPL(dB)"];
  for (let k = 0; fromHz * 2 ** (k / 12) <= 20000; k++) {
    lines.push(`${(fromHz * 2 ** (k / 12)).toFixed(2)}\t${(level + tilt * (k / 12) + 0.2 * Math.sin(k * (1 + level))).toFixed(3)}`);
  }
  return lines.join("\n");
}

async function measuredBatch(partType: PartType, lot: string, levels: number[], fromHz: number) {
  const batch = await registerBatch(db(), { partType, partNumber: "P-TEST", maker: "Test maker", lot, receivedOn: "2026-11-30", makerSerials: [], count: levels.length }, actor);
  const units = await batchUnitsView(db(), batch.id);
  await importResponseFiles(db(), units.map((u, i) => ({ name: `${u.identity}.txt`, text: responseFile(u.identity, levels[i]!, i % 3 === 0 ? 0.05 : -0.03, fromHz) })), { batchId: batch.id, source: "upload" }, actor);
  return batch;
}

const readiness = async () => {
  const batches = (await listBatches(db())).filter((b) => b.free >= 2);
  return Object.fromEntries([...(await matchReadinessOf(db(), batches))].sort());
};
const keptRows = () => db().select().from(responseBands).orderBy(responseBands.responseId);

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const [u] = await db().select().from(users).where(eq(users.email, "lab@demo.twinleaf.test"));
  actor = { id: u!.id };
  // Tweeters measured from 1 kHz cover their 1.6–20 kHz passband: two close pairs and one apart.
  await measuredBatch("tweeter", "RB-1", [90, 90.1, 91.5, 91.6, 94], 1000);
  // Two that are 2 dB apart: readiness says why none can pair.
  await measuredBatch("tweeter", "RB-2", [88, 90], 1000);
  // Midrange units measured from 1 kHz do not reach down to their 200 Hz passband: nothing is kept.
  await measuredBatch("midrange", "RB-3", [87, 87.1], 1000);
});

describe("band levels kept with a drive unit's response", () => {
  test("are the acoustics library's band levels of the stored points over the part type's passband", async () => {
    const rows = await db().all<{ id: number; part_type: string; points: string }>(sql`
      SELECT r.id, i.part_type, r.points FROM responses r JOIN items i ON i.id = r.item_id WHERE i.kind = 'drive_unit' AND i.part_type = 'tweeter' AND r.purpose = 'unit'`);
    expect(rows.length).toBe(7);
    const kept = new Map((await keptRows()).map((k) => [k.responseId, k]));
    // The tweeter passband, 1.6–20 kHz (common practice; lib/lab/response-bands.ts).
    const bands = thirdOctaveBands(1600, 20000);
    for (const r of rows) {
      const points = (JSON.parse(r.points) as number[][]).map(([hz, db]) => ({ hz: hz!, db: db! }));
      const row = kept.get(Number(r.id));
      expect(row, `response ${r.id}`).toBeDefined();
      expect(row!.minHz).toBe(1600);
      expect(row!.maxHz).toBe(20000);
      expect(row!.levels).toEqual(bandLevels(points, bands));
    }
  });

  test("a response that does not cover the passband keeps none, and readiness still says why it cannot be matched", async () => {
    const mids = await db().all<{ id: number }>(sql`SELECT r.id FROM responses r JOIN items i ON i.id = r.item_id WHERE i.part_type = 'midrange' AND i.kind = 'drive_unit'`);
    const kept = new Set((await keptRows()).map((k) => k.responseId));
    expect(mids.length).toBeGreaterThan(0);
    for (const m of mids) expect(kept.has(Number(m.id))).toBe(false);
    const batch = (await listBatches(db())).find((b) => b.lot === "RB-3")!;
    const r = (await matchReadinessOf(db(), [batch])).get(batch.id)!;
    expect(r.canMatch).toBe(false);
  });

  test("readiness is the same from the kept levels as from the points, and filling brings back what was kept", async () => {
    const withKept = await readiness();
    const before = await keptRows();
    expect(Object.values(withKept).some((r) => r.canMatch)).toBe(true);
    expect(Object.values(withKept).some((r) => !r.canMatch && r.why)).toBe(true);

    await db().delete(responseBands);
    expect(await readiness()).toEqual(withKept);

    expect(await fillBandLevels(db())).toBe(before.length);
    expect(await keptRows()).toEqual(before);
    // Nothing left to fill: a second run fills nothing.
    expect(await fillBandLevels(db())).toBe(0);
  });

  test("levels kept over another passband (one since changed in code) are not used: the points are banded again", async () => {
    const withKept = await readiness();
    await db().run(sql`UPDATE response_bands SET min_hz = 1000`);
    try {
      expect(await readiness()).toEqual(withKept);
    } finally {
      await db().run(sql`UPDATE response_bands SET min_hz = 1600`);
    }
  });
});
