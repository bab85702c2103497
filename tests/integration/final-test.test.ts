import { eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { finalTests, items, models, nonconformances, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { createItem, fit } from "@/lib/genealogy/graph";
import { recordFinalTest } from "@/lib/lab/final-test";
import { dispositionNc } from "@/lib/route/nonconformances";
import { allocateSerial } from "@/lib/serials/allocator";
import { failureText } from "./helpers";

const db = () => getDb();
let lab = "";
let quality = "";
let model: typeof models.$inferSelect;

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const id = async (e: string) => (await db().select().from(users).where(eq(users.email, e)))[0]!.id;
  lab = await id("lab@demo.twinleaf.test");
  quality = await id("quality@demo.twinleaf.test");
  model = (await db().select().from(models))[0]!;
});

/** A built pair waiting for its test: two speakers at L and R (the assembly station's result). */
async function builtPair() {
  return db().transaction(async (tx) => {
    const by = { actorId: lab, station: "assembly" as const };
    const year = 2026;
    const pair = await createItem(tx, { kind: "pair", identity: await allocateSerial(tx, { kind: "pair", code: model.code, year }), state: "awaiting_test", modelId: model.id }, by);
    for (const side of ["L", "R"]) {
      const s = await createItem(tx, { kind: "speaker", identity: await allocateSerial(tx, { kind: "speaker", code: model.code, year }), state: "built", modelId: model.id, attrs: { side } }, by);
      await fit(tx, { parent: pair, child: s, position: side }, by);
    }
    return pair;
  });
}

/** A made-up flat response over the model's range and a little beyond, 1/12 octave apart. */
const flat = (level: number) => ({
  name: "r.txt",
  text: ["Freq SPL", ...Array.from({ length: 12 * 8 }, (_, k) => `${(100 * 2 ** (k / 12)).toFixed(3)} ${level}`)].join("\n"),
});

describe("the final pair test", () => {
  test("a band exactly at the limit passes; the pair is ready to pack", async () => {
    const pair = await builtPair();
    // 1 dB apart in every band: |L − R| = 1.0 dB, exactly the demo models' limit.
    const r = await recordFinalTest(db(), { pair: pair.identity, left: flat(90), right: flat(90 + model.pairResponseLimitDb) }, { id: lab });
    expect(r.comparison.pass).toBe(true);
    expect(r.comparison.maxAbsDiffDb).toBeCloseTo(model.pairResponseLimitDb, 9);
    const [after] = await db().select().from(items).where(eq(items.id, pair.id));
    expect(after!.state).toBe("ready_to_pack");
  });

  test("just above the limit fails, names the band, and opens a nonconformance quality can accept as is", async () => {
    const pair = await builtPair();
    const left = flat(90);
    // Every point of the 1 kHz band (891.251–1122.018 Hz, IEC 61260-1 edges in docs/REFERENCES.md, § One-third-octave bands) of the right response 0.01 dB over the limit, the rest equal.
    const right = { name: "r.txt", text: left.text.split("\n").map((l, i) => (i === 0 ? l : (() => { const [hz, db] = l.split(" "); return Number(hz) >= 891.251 && Number(hz) < 1122.018 ? `${hz} ${Number(db) + model.pairResponseLimitDb + 0.01}` : l; })())).join("\n") };
    const r = await recordFinalTest(db(), { pair: pair.identity, left, right }, { id: lab });
    expect(r.comparison.pass).toBe(false);
    expect(r.comparison.worstBand).toBe("1k");
    expect(r.nc).toMatch(/^NC-/);
    const [nc] = await db().select().from(nonconformances).where(eq(nonconformances.code, r.nc!));
    // The band by its ISO 266 name with its unit (docs/REFERENCES.md, § One-third-octave bands: the 1k band), the figures with theirs.
    expect(nc!.finding).toBe(`Final test: left and right differ by ${(model.pairResponseLimitDb + 0.01).toFixed(2)} dB at 1 kHz (limit ${model.pairResponseLimitDb.toFixed(1)} dB)`);
    expect(await failureText(() => dispositionNc(db(), { ncId: nc!.id, disposition: "scrap", scrapSide: "L", reason: "try scrap" }, { id: quality }))).toMatch(/reworked .* or used as is/);
    await dispositionNc(db(), { ncId: nc!.id, disposition: "use_as_is", reason: "one band 0.01 dB over; listening test fine" }, { id: quality });
    const [after] = await db().select().from(items).where(eq(items.id, pair.id));
    expect(after!.state).toBe("ready_to_pack");
  });

  test("a broken file is refused with its line, and nothing is written", async () => {
    const pair = await builtPair();
    const before = Number((await db().select({ n: sql<number>`count(*)` }).from(finalTests))[0]!.n);
    const bad = { name: "right.txt", text: flat(90).text.replace(/\n.*\n/, "\n100 abc\n") };
    const msg = await recordFinalTest(db(), { pair: pair.identity, left: flat(90), right: bad }, { id: lab }).catch((e) => e);
    expect(msg.fieldErrors.files.join(" ")).toMatch(/Right \(right\.txt\), line 2/);
    expect(Number((await db().select({ n: sql<number>`count(*)` }).from(finalTests))[0]!.n)).toBe(before);
    expect(await failureText(() => recordFinalTest(db(), { pair: "P-NOPE-26-00001-0", left: flat(90), right: flat(90) }, { id: lab }))).toMatch(/not a pair/);
  });
});
