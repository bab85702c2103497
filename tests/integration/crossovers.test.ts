/**
 * Crossover boards: building from component lots, the part checks, and left/right pairing.
 *
 * The checks rest on IEC 60063 (E24 preferred values: 4.7 and 5.1 are neighbours, 4.8 is not a
 * value) and IEC 60062 (tolerance letters: J is ±5 %), as listed in docs/REFERENCES.md, § Crossover networks,
 * "Crossover networks". All lots, part numbers and responses here are invented.
 */
import { and, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { crossoverParts, events, items, matchedSets, models, responses, setMembers, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { AppError } from "@/lib/auth/errors";
import { traceBackward, traceForward } from "@/lib/genealogy/trace";
import { acceptCrossoverPlan, BoardsTakenError, buildCrossover, crossoverBoards, matchCrossovers, type BoardPartInput } from "@/lib/lab/crossovers";
import type { LabActor } from "@/lib/vocabulary/actor";
import { failureText } from "./helpers";

const db = () => getDb();
let actor: LabActor;
let pw2: typeof models.$inferSelect;
let sl3: typeof models.$inferSelect;

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const [u] = await db().select().from(users).where(eq(users.email, "lab@demo.twinleaf.test"));
  actor = { id: u!.id };
  const all = await db().select().from(models);
  pw2 = all.find((m) => m.code === "PW2")!;
  sl3 = all.find((m) => m.code === "SL3")!;
});

/** A board's usual parts, all within tolerance. */
const goodParts = (tag: string): BoardPartInput[] => [
  { position: "C1", lot: `LOT-T${tag}-C47`, partNumber: "PP-475-400", nominal: "4.7µF", tolerance: "J", reading: "4.75µF" },
  { position: "L1", lot: `LOT-T${tag}-L82`, partNumber: "AC-082", nominal: "0.82mH", tolerance: "K", reading: "0.80 mH" },
  { position: "R1", lot: `LOT-T${tag}-R82`, partNumber: "WW-8R2-10", nominal: "8.2Ω", tolerance: "J", reading: "8R1" },
  // The same lot at a second position: lots are shared, a board may take two parts of one.
  { position: "R2", lot: `LOT-T${tag}-R82`, partNumber: "WW-8R2-10", nominal: "8R2", tolerance: "J", reading: "8.3" },
];

/** A smooth invented response from 100 Hz to 20 kHz, 1/24 octave apart, as a measuring program writes it. */
function responseFile(offsetDb: number, tiltDb = 0): string {
  const lines = ["* invented response for a test", "Freq(Hz) SPL(dB) Phase(deg)"];
  for (let hz = 100; hz <= 20000; hz *= 2 ** (1 / 24)) {
    const o = Math.log10(hz / 1000);
    const db = 86 + offsetDb + 1.5 * Math.sin(2.2 * o) - 0.8 * o * o + tiltDb * o;
    lines.push(`${hz.toFixed(2)} ${db.toFixed(3)} ${(-40 * o).toFixed(1)}`);
  }
  return lines.join("\n");
}

async function counts() {
  const n = async (t: typeof items | typeof crossoverParts | typeof events | typeof responses) => Number((await db().select({ n: sql<number>`count(*)` }).from(t))[0]!.n);
  return { items: await n(items), parts: await n(crossoverParts), events: await n(events), responses: await n(responses) };
}

async function appErrorOf(fn: () => Promise<unknown>): Promise<AppError> {
  try {
    await fn();
  } catch (e) {
    if (e instanceof AppError) return e;
    throw e;
  }
  throw new Error("expected the call to be refused, but it succeeded");
}

describe("building a board", () => {
  test("a board whose parts are within tolerance is in stock, with its lots fitted at their positions and a row per part", async () => {
    const { crossover, verdict } = await buildCrossover(db(), { modelId: pw2.id, parts: goodParts("A") }, actor);
    expect(verdict).toMatchObject({ pass: true, reasons: [] });
    expect(crossover.identity).toMatch(/^X-PW2-\d{2}-\d{5}-[0-9A-Z*]$/);
    const [row] = await db().select().from(items).where(eq(items.id, crossover.id));
    expect(row).toMatchObject({ kind: "crossover", modelId: pw2.id, state: "in_stock" });

    const trace = await traceBackward(db(), crossover.id);
    const fitted = trace.filter((n) => n.depth === 1).map((n) => `${n.position}:${n.identity}:${n.kind}`).sort();
    expect(fitted).toEqual(["C1:LOT-TA-C47:component_lot", "L1:LOT-TA-L82:component_lot", "R1:LOT-TA-R82:component_lot", "R2:LOT-TA-R82:component_lot"]);

    const parts = await db().select().from(crossoverParts).where(eq(crossoverParts.crossoverId, crossover.id)).orderBy(crossoverParts.position);
    expect(parts.map((p) => [p.position, p.unit, p.tolerance])).toEqual([
      ["C1", "F", "J"],
      ["L1", "H", "K"],
      ["R1", "Ω", "J"],
      ["R2", "Ω", "J"],
    ]);
    // Stored in SI base units.
    expect(parts[0]!.nominal).toBeCloseTo(4.7e-6, 15);
    expect(parts[0]!.reading).toBeCloseTo(4.75e-6, 15);
    expect(parts[1]!.nominal).toBeCloseTo(0.82e-3, 12);
    expect(parts[2]!.reading).toBeCloseTo(8.1, 12);

    const [built] = await db().select().from(events).where(and(eq(events.type, "crossover.built"), eq(events.subjectId, crossover.id)));
    expect(built!.data).toMatchObject({ identity: crossover.identity, model: "PW2", pass: true, reasons: [] });
    expect(parts.every((p) => p.eventId === built!.id)).toBe(true);
  });

  test("a reading 6 % over a J (±5 %) part records the board as failed, with the reason naming the part", async () => {
    const parts = goodParts("B");
    parts[0] = { ...parts[0]!, reading: "4.982µF" };
    const { crossover, verdict } = await buildCrossover(db(), { modelId: pw2.id, parts }, actor);
    expect(verdict.pass).toBe(false);
    expect(verdict.reasons).toHaveLength(1);
    expect(verdict.reasons[0]).toMatch(/^C1 reads 4\.982 µF, 6\.0 % over its 4\.7 µF nominal; J allows ±5 %$/);

    const [row] = await db().select().from(items).where(eq(items.id, crossover.id));
    expect(row!.state).toBe("failed");
    const [change] = await db()
      .select()
      .from(events)
      .where(and(eq(events.type, "item.state_changed"), eq(events.subjectId, crossover.id), sql`json_extract(${events.data}, '$.to') = 'failed'`));
    expect(change!.reason).toMatch(/C1 reads 4\.982 µF/);
    // The board physically exists: its parts are on record all the same.
    expect(await db().select().from(crossoverParts).where(eq(crossoverParts.crossoverId, crossover.id))).toHaveLength(4);

    const listed = (await crossoverBoards(db(), { limit: 50 })).find((b) => b.id === crossover.id)!;
    expect(listed).toMatchObject({ state: "failed", pass: false, parts: 4, hasResponse: false, setCode: null, model: "PW2" });
    expect(listed.reasons[0]).toMatch(/^C1 reads/);
  });

  test("a part without a reading fails the board: every part is measured", async () => {
    const parts = goodParts("N");
    parts[1] = { ...parts[1]!, reading: "" };
    const { verdict } = await buildCrossover(db(), { modelId: pw2.id, parts }, actor);
    expect(verdict.pass).toBe(false);
    expect(verdict.reasons).toEqual(["L1 has no reading"]);
  });

  test("a reading typed without a unit takes the nominal's unit, prefix included, and the board passes", async () => {
    const parts = goodParts("U");
    // 4.72 against 4.7 µF is 4.72 µF (+0.4 %), 0.81 against 0.82 mH is 0.81 mH (−1.2 %).
    parts[0] = { ...parts[0]!, reading: "4.72" };
    parts[1] = { ...parts[1]!, reading: "0.81" };
    const { crossover, verdict } = await buildCrossover(db(), { modelId: pw2.id, parts }, actor);
    expect(verdict).toMatchObject({ pass: true, reasons: [] });
    const stored = await db().select().from(crossoverParts).where(eq(crossoverParts.crossoverId, crossover.id)).orderBy(crossoverParts.position);
    expect(stored[0]!.reading).toBe(4.72e-6);
    expect(stored[1]!.reading).toBe(0.81e-3);
  });

  test.each([
    ["4.72F", /Row 1 \(C1\): Reading: "4\.72F" reads as 4\.72 F, more than ten times its 4\.7 µF nominal/],
    ["47.5", /Row 1 \(C1\): Reading: "47\.5" reads as 47\.5 µF \(a number alone is read in µF, as the nominal is written\), more than ten times its 4\.7 µF nominal/],
    ["0.47n", /Row 1 \(C1\): Reading: "0\.47n" reads as 0\.47 nF, less than a tenth of its 4\.7 µF nominal/],
  ])("a reading %j, more than ten times away from its nominal, is refused as a slip and nothing is written", async (reading, message) => {
    const before = await counts();
    const parts = goodParts("S");
    parts[0] = { ...parts[0]!, reading };
    const e = await appErrorOf(() => buildCrossover(db(), { modelId: pw2.id, parts }, actor));
    expect(e.status).toBe(400);
    expect(e.message).toMatch(/^Nothing was saved: 1 row needs attention\./);
    expect(e.fieldErrors?.parts?.join("\n")).toMatch(message);
    expect(e.fieldErrors?.["parts.0"]?.[0]).toMatch(/^Reading: .*That looks like a slip of the unit or the decimal point/);
    expect(await counts()).toEqual(before);
  });

  test("a nominal off the E24 series (4.8 µF) is refused as a typing error, naming its neighbours, and nothing is written", async () => {
    const before = await counts();
    const parts = goodParts("C");
    parts[0] = { ...parts[0]!, nominal: "4.8µF", reading: "4.8µF" };
    const e = await appErrorOf(() => buildCrossover(db(), { modelId: pw2.id, parts }, actor));
    expect(e.status).toBe(400);
    expect(e.message).toMatch(/^Nothing was saved/);
    // IEC 60063 E24: …4.3, 4.7, 5.1…
    expect(e.fieldErrors?.["parts.0"]?.join(" ")).toMatch(/4\.8 µF is not an E24 value; the nearest are 4\.7 µF and 5\.1 µF/);
    expect(e.fieldErrors?.["parts.1"]).toBeUndefined();
    expect(e.fieldErrors?.parts?.[0]).toMatch(/^Row 1 \(C1\): /);
    expect(await counts()).toEqual(before);
    expect(await db().select().from(items).where(eq(items.identity, "LOT-TC-C47"))).toHaveLength(0);
  });

  test("an unknown tolerance letter is refused and nothing is written", async () => {
    const before = await counts();
    const parts = goodParts("D");
    parts[2] = { ...parts[2]!, tolerance: "X" };
    const e = await appErrorOf(() => buildCrossover(db(), { modelId: pw2.id, parts }, actor));
    expect(e.status).toBe(400);
    // IEC 60062 letters.
    expect(e.fieldErrors?.["parts.2"]?.join(" ")).toMatch(/"X" is not an IEC 60062 tolerance letter; use one of B \(±0\.1 %\).*J \(±5 %\)/);
    expect(await counts()).toEqual(before);
  });

  test("every row's problems are reported at once, under its own index", async () => {
    const before = await counts();
    const parts: BoardPartInput[] = [
      { position: "Q7", lot: "LOT-TE-1", partNumber: "", nominal: "4.7µF", tolerance: "J", reading: "4.7µF" },
      { position: "C2", lot: "LOT-TE-2", partNumber: "PP", nominal: "8.2Ω", tolerance: "J", reading: "" },
      { position: "L1", lot: "LOT-TE-3", partNumber: "AC", nominal: "1mH", tolerance: "K", reading: "0.9 µF" },
      { position: "C2", lot: "LOT-TE-2", partNumber: "PP", nominal: "4u7", tolerance: "J", reading: "4u7" },
    ];
    const e = await appErrorOf(() => buildCrossover(db(), { modelId: pw2.id, parts }, actor));
    expect(e.fieldErrors?.["parts.0"]?.join(" ")).toMatch(/"Q7" is not a position/);
    expect(e.fieldErrors?.["parts.0"]?.join(" ")).toMatch(/part number/);
    expect(e.fieldErrors?.["parts.1"]?.join(" ")).toMatch(/capacitance \(F\) is expected/);
    expect(e.fieldErrors?.["parts.2"]?.join(" ")).toMatch(/^Reading: .*inductance \(H\) is expected/);
    expect(e.fieldErrors?.["parts.3"]?.join(" ")).toMatch(/C2 is listed already, in row 2/);
    expect(await counts()).toEqual(before);
  });

  test("a row left empty is refused, never dropped: a board missing a part must not pass", async () => {
    const before = await counts();
    const parts = [...goodParts("E"), { position: "C2", lot: "", partNumber: "", nominal: "", tolerance: "J", reading: "" }];
    const e = await appErrorOf(() => buildCrossover(db(), { modelId: pw2.id, parts }, actor));
    expect(e.fieldErrors?.["parts.4"]).toEqual(["This row is empty: fill it in, or remove it if the board has no such part."]);
    expect(await counts()).toEqual(before);
  });

  test("an inactive or unknown model is refused", async () => {
    const e = await appErrorOf(() => buildCrossover(db(), { modelId: "no-such-model", parts: goodParts("M") }, actor));
    expect(e.fieldErrors?.modelId?.[0]).toMatch(/Choose the model/);
  });

  test("a response file with a bad line is refused naming the line, and nothing is written", async () => {
    const before = await counts();
    const text = responseFile(0).split("\n");
    text[5] = "1000 loud";
    const e = await appErrorOf(() => buildCrossover(db(), { modelId: pw2.id, parts: goodParts("R"), response: { name: "board.txt", text: text.join("\n") } }, actor));
    expect(e.fieldErrors?.response?.[0]).toMatch(/^board\.txt, line 6: /);
    expect(await counts()).toEqual(before);
  });
});

describe("component lots", () => {
  test("a lot code not yet registered is registered as a component lot with its part, and shared by later boards", async () => {
    const { crossover: first } = await buildCrossover(db(), { modelId: sl3.id, parts: goodParts("L") }, actor);
    const [lot] = await db().select().from(items).where(eq(items.identity, "LOT-TL-C47"));
    expect(lot).toMatchObject({ kind: "component_lot", state: "in_stock", partType: "capacitor" });
    expect(lot!.attrs).toMatchObject({ partNumber: "PP-475-400", unit: "F", tolerance: "J" });
    expect(lot!.attrs.nominal as number).toBeCloseTo(4.7e-6, 15);

    // Written in lower case the second time: lot codes are read in capitals.
    const again = goodParts("L").map((p) => ({ ...p, lot: p.lot.toLowerCase() }));
    const { crossover: second } = await buildCrossover(db(), { modelId: sl3.id, parts: again }, actor);
    expect(await db().select().from(items).where(eq(items.identity, "LOT-TL-C47"))).toHaveLength(1);
    const holders = (await traceForward(db(), lot!.id)).map((h) => h.identity);
    expect(holders).toEqual(expect.arrayContaining([first.identity, second.identity]));
  });

  test("a registered lot of another value, or a code that is not a lot, is refused", async () => {
    const before = await counts();
    const wrongValue = goodParts("L");
    wrongValue[0] = { ...wrongValue[0]!, nominal: "10µF", reading: "10µF" };
    const e1 = await appErrorOf(() => buildCrossover(db(), { modelId: sl3.id, parts: wrongValue }, actor));
    expect(e1.fieldErrors?.["parts.0"]?.join(" ")).toMatch(/LOT-TL-C47 holds 4\.7 µF parts, not 10 µF/);

    const { crossover } = await buildCrossover(db(), { modelId: sl3.id, parts: goodParts("S") }, actor);
    const afterBoard = await counts();
    const notALot = goodParts("S");
    notALot[1] = { ...notALot[1]!, lot: crossover.identity };
    const e2 = await appErrorOf(() => buildCrossover(db(), { modelId: sl3.id, parts: notALot }, actor));
    expect(e2.fieldErrors?.["parts.1"]?.join(" ")).toMatch(/is registered as a crossover, not a component lot/);
    expect(await counts()).toEqual(afterBoard);
    expect(afterBoard.items).toBeGreaterThan(before.items);
  });
});

describe("pairing boards", () => {
  const boards: string[] = [];

  beforeAll(async () => {
    // Two boards a few hundredths of a dB apart, one a whole dB louder, one failed (never offered).
    for (const [tag, offset, tilt] of [["P1", 0, 0], ["P2", 0.05, 0.03], ["P3", 1.2, 0]] as const) {
      const { crossover, verdict } = await buildCrossover(db(), { modelId: pw2.id, parts: goodParts(tag), response: { name: `${tag}.txt`, text: responseFile(offset, tilt) } }, actor);
      expect(verdict.pass).toBe(true);
      boards.push(crossover.identity);
    }
    const bad = goodParts("P4");
    bad[0] = { ...bad[0]!, reading: "5.2µF" };
    const { crossover } = await buildCrossover(db(), { modelId: pw2.id, parts: bad, response: { name: "P4.txt", text: responseFile(0) } }, actor);
    boards.push(crossover.identity);
  });

  test("matchCrossovers pairs the two close boards over the model's bands and says why the others are single", async () => {
    const view = await matchCrossovers(db(), { modelId: pw2.id, limitDb: 0.5 });
    // PW2's range is 200 Hz–10 kHz: the one-third-octave bands 200 … 10k.
    expect(view.bands[0]!.nominal).toBe("200");
    expect(view.bands.at(-1)!.nominal).toBe("10k");
    expect(view.units.map((u) => u.id).sort()).toEqual([boards[0], boards[1], boards[2]].sort());
    expect(view.plan.pairs).toHaveLength(1);
    expect([view.plan.pairs[0]!.a, view.plan.pairs[0]!.b].sort()).toEqual([boards[0], boards[1]].sort());
    expect(view.plan.pairs[0]!.maxDiffDb).toBeLessThan(0.2);
    // The band named by its ISO 266 name and unit, never by its index ("at band 13").
    expect(view.plan.single).toEqual([{ id: boards[2], reason: expect.stringMatching(/^no partner within 0\.5 dB: the closest, X-PW2-.*, differs by 1\.\d+ dB at \d+(\.\d+)? k?Hz$/), closest: expect.objectContaining({ maxDiffDb: expect.any(Number) }) }]);
    // The failed board is not offered; boards without a response are listed as not ready.
    expect(view.units.find((u) => u.id === boards[3])).toBeUndefined();
    expect(view.notReady.every((n) => n.reason === "no response measured yet")).toBe(true);
  });

  test("a limit looser than the model's finished-pair limit is refused", async () => {
    const e = await appErrorOf(() => matchCrossovers(db(), { modelId: pw2.id, limitDb: 3 }));
    expect(e.message).toMatch(/finished-pair limit of 1\.0 dB/);
  });

  test("a pair over the limit cannot be accepted, whatever is sent", async () => {
    const before = await counts();
    const e = await appErrorOf(() => acceptCrossoverPlan(db(), { modelId: pw2.id, limitDb: 0.5, pairs: [{ a: boards[0]!, b: boards[2]! }] }, actor));
    expect(e.message).toMatch(/differ by 1\.\d\d dB at \d+(\.\d+)? k?Hz, over the 0\.5 dB limit/);
    expect(await counts()).toEqual(before);
  });

  test("two acceptances at once: exactly one reserves the set, the other names the boards", async () => {
    const view = await matchCrossovers(db(), { modelId: pw2.id, limitDb: 0.5 });
    const pairs = view.plan.pairs.map((p) => ({ a: p.a, b: p.b }));
    const results = await Promise.allSettled([acceptCrossoverPlan(db(), { modelId: pw2.id, limitDb: 0.5, pairs }, actor), acceptCrossoverPlan(db(), { modelId: pw2.id, limitDb: 0.5, pairs }, actor)]);
    const ok = results.filter((r) => r.status === "fulfilled");
    const refused = results.filter((r): r is PromiseRejectedResult => r.status === "rejected");
    expect(ok).toHaveLength(1);
    expect(refused).toHaveLength(1);
    expect(refused[0]!.reason).toBeInstanceOf(BoardsTakenError);
    expect((refused[0]!.reason as AppError).status).toBe(409);
    expect(refused[0]!.reason.message).toContain(boards[0]);
    expect(refused[0]!.reason.message).toContain(boards[1]);

    const [set] = (ok[0] as PromiseFulfilledResult<{ code: string; left: string; right: string }[]>).value;
    expect(set!.code).toBe("M-X-PW2-001");
    const [row] = await db().select().from(matchedSets).where(eq(matchedSets.code, set!.code));
    expect(row).toMatchObject({ kind: "crossover", modelId: pw2.id, limitDb: 0.5, batchId: null });
    const members = await db().select({ side: setMembers.side, identity: items.identity, state: items.state }).from(setMembers).innerJoin(items, eq(items.id, setMembers.itemId)).where(eq(setMembers.setId, row!.id));
    expect(members.map((m) => `${m.side}:${m.identity}:${m.state}`).sort()).toEqual([`L:${set!.left}:reserved`, `R:${set!.right}:reserved`]);
    expect(await db().select().from(events).where(and(eq(events.type, "set.matched"), eq(events.subjectId, row!.id)))).toHaveLength(1);

    // Reserved boards are no longer offered, and the table shows their set.
    expect((await matchCrossovers(db(), { modelId: pw2.id, limitDb: 0.5 })).units.map((u) => u.id)).toEqual([boards[2]]);
    const listed = await crossoverBoards(db(), { modelId: pw2.id, limit: 100 });
    expect(listed.find((b) => b.identity === boards[0])).toMatchObject({ setCode: "M-X-PW2-001", hasResponse: true, state: "reserved" });
  });
});

describe("the record", () => {
  test("the database refuses to change or delete a crossover_parts row", async () => {
    const [part] = await db().select().from(crossoverParts).limit(1);
    expect(await failureText(() => db().run(sql`UPDATE crossover_parts SET reading = 1 WHERE id = ${part!.id}`))).toMatch(/a crossover build is a record/);
    expect(await failureText(() => db().run(sql`DELETE FROM crossover_parts WHERE id = ${part!.id}`))).toMatch(/never deleted/);
  });
});
