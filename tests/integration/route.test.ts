import { eq, sql } from "drizzle-orm";
import { afterEach, beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { finishes, items, links, models, nonconformances, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { setClock } from "@/lib/clock";
import { traceBackward } from "@/lib/genealogy/trace";
import { createSpecVersion, currentSpec } from "@/lib/route/specs";
import { dispositionNc, repartner } from "@/lib/route/nonconformances";
import { pairRoute, recordStep } from "@/lib/route/pair-route";
import { checkReadings, outOfWindowConfirmation } from "@/lib/route/rules";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { makeLacquerCabinets } from "@/lib/cabinets/lacquer";
import { goodReadings } from "../fixtures/route";
import { failureText } from "./helpers";

const db = () => getDb();
let cabinetUser = "";
let qualityUser = "";
let adminUser = "";
let model: typeof models.$inferSelect;

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const byEmail = async (e: string) => (await db().select().from(users).where(eq(users.email, e)))[0]!.id;
  cabinetUser = await byEmail("cabinet@demo.twinleaf.test");
  qualityUser = await byEmail("quality@demo.twinleaf.test");
  adminUser = await byEmail("admin@demo.twinleaf.test");
  model = (await db().select().from(models)).find((m) => m.leavesPerFace === 2)!;
});
afterEach(() => setClock(null));

/** A veneered pair from a new flitch, as the veneer room makes it. */
async function newPair() {
  const veneerUser = (await db().select().from(users).where(eq(users.email, "veneer@demo.twinleaf.test")))[0]!.id;
  const walnut = (await db().select().from(finishes)).find((f) => f.kind === "veneer")!;
  const flitch = await receiveFlitch(db(), { finishId: walnut.id, logReference: "R", supplier: "S", receivedOn: "2026-11-01", leafThicknessMm: 0.6, leafCount: 4 }, { id: veneerUser });
  const view = (await flitchView(db(), flitch.identity))!;
  for (const l of view.leaves) await measureLeaf(db(), l.id, { lengthMm: 900, widthMm: 300, usable: true }, { id: veneerUser });
  const [made] = await confirmRuns(db(), { flitchId: flitch.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, { id: veneerUser });
  return made!;
}

const T0 = new Date("2026-12-07T08:00:00Z");
const at = (ms: number) => new Date(T0.getTime() + ms);
const MIN = 60_000;
const HOUR = 60 * MIN;
const DAY = 24 * HOUR;


/** Records a step; readings out of their window are confirmed, as the person recording would after being asked. */
async function step(pairId: string, seq: number, when: Date, readings?: Record<string, string | boolean>, sides: ("L" | "R")[] = ["L", "R"]) {
  setClock(when);
  const spec = (await pairRoute(db(), (await db().select().from(items).where(eq(items.id, pairId)))[0]!)).spec;
  const s = spec.steps.find((x) => x.seq === seq)!;
  const input = Object.fromEntries(Object.entries(readings ?? goodReadings(s.key)).map(([k, v]) => [k, v === "pass" ? true : v]));
  const checked = checkReadings(s, input);
  const confirmOutOfWindow = checked.ok ? outOfWindowConfirmation(checked.outOfWindow) : null;
  return recordStep(db(), { pairId, seq, sides, startedAt: when, readings: input, confirmOutOfWindow }, { id: cabinetUser });
}

describe("the cabinet route, at its boundaries (values: common practice)", () => {
  test("a press reading of 134 °C or 141 °C opens a nonconformance; 135 °C and 140 °C do not", async () => {
    for (const [c, opens] of [["134", true], ["135", false], ["140", false], ["141", true]] as const) {
      const { pair } = await newPair();
      const out = await step(pair.id, 1, T0, { platenC: c, minutes: "22" });
      expect(out.nc !== null, `${c} °C`).toBe(opens);
    }
  });

  test("a trim deviation of 0.21 mm opens one and 0.20 mm does not", async () => {
    for (const [d, opens] of [["0.21", true], ["0.20", false], ["-0.21", true]] as const) {
      const { pair } = await newPair();
      await step(pair.id, 1, T0);
      const out = await step(pair.id, 2, at(HOUR), { deviationMm: d });
      expect(out.nc !== null, `${d} mm`).toBe(opens);
    }
  });

  test("the step after brace fitting: refused 3 h 59 min after the clamp started, allowed at 4 h", async () => {
    const { pair } = await newPair();
    await step(pair.id, 1, T0);
    await step(pair.id, 2, at(HOUR));
    await step(pair.id, 3, at(2 * HOUR));
    const msg = await failureText(() => step(pair.id, 4, at(2 * HOUR + 3 * HOUR + 59 * MIN)));
    expect(msg).toMatch(/Not before 14:00 on 7 Dec \(UTC\)/);
    await expect(step(pair.id, 4, at(6 * HOUR))).resolves.toMatchObject({ nc: null });
  });

  test("the eighth coat needs flatting first; polishing is refused 13 d 23 h after the last coat and allowed at 14 d", async () => {
    const { pair } = await newPair();
    let t = 0;
    for (const seq of [1, 2, 3]) await step(pair.id, seq, at((t += HOUR)));
    t += 5 * HOUR;
    for (const seq of [4, 5, 6, 7, 8, 9]) await step(pair.id, seq, at((t += HOUR)));
    // Coat 4 done (seq 9); the next is flatting (seq 10), so coat 8 (seq 14) is refused naming it.
    expect(await failureText(() => step(pair.id, 14, at((t += HOUR))))).toMatch(/Flatting back/);
    for (const seq of [10, 11, 12, 13, 14]) await step(pair.id, seq, at((t += HOUR)));
    const lastCoat = at(t);
    expect(await failureText(() => step(pair.id, 15, new Date(lastCoat.getTime() + 13 * DAY + 23 * HOUR)))).toMatch(/Not before/);
    await expect(step(pair.id, 15, new Date(lastCoat.getTime() + 14 * DAY))).resolves.toMatchObject({ nc: null });
  });

  test("a step out of order is refused and names the next step", async () => {
    const { pair } = await newPair();
    expect(await failureText(() => step(pair.id, 2, T0))).toMatch(/next step is 1, Forming press/);
  });
});

describe("nonconformances and their dispositions", () => {
  test("an open nonconformance holds the pair; rework sends both cabinets back to the named step", async () => {
    const { pair } = await newPair();
    await step(pair.id, 1, T0);
    const { nc } = await step(pair.id, 2, at(HOUR), { deviationMm: "0.3" });
    expect(nc).toMatch(/^NC-/);
    expect(await failureText(() => step(pair.id, 3, at(2 * HOUR)))).toMatch(/on hold/);
    const [row] = await db().select().from(nonconformances).where(eq(nonconformances.code, nc!));
    setClock(at(3 * HOUR));
    await dispositionNc(db(), { ncId: row!.id, disposition: "rework", reworkToSeq: 2, reason: "retrim the front edge" }, { id: qualityUser });
    const route = await pairRoute(db(), pair, at(3 * HOUR));
    expect(route.position.cabinets.map((c) => c.next?.key)).toEqual(["trim", "trim"]);
    await expect(step(pair.id, 2, at(4 * HOUR))).resolves.toMatchObject({ nc: null });
    expect(await failureText(() => dispositionNc(db(), { ncId: row!.id, disposition: "use_as_is", reason: "again" }, { id: qualityUser }))).toMatch(/already dispositioned/);
  });

  test("use as is records the deviation with its approver and releases the hold", async () => {
    const { pair } = await newPair();
    const { nc } = await step(pair.id, 1, T0, { platenC: "141", minutes: "22" });
    const [row] = await db().select().from(nonconformances).where(eq(nonconformances.code, nc!));
    await dispositionNc(db(), { ncId: row!.id, disposition: "use_as_is", reason: "1 °C over for 2 minutes; bond tested sound" }, { id: qualityUser });
    const [after] = await db().select().from(nonconformances).where(eq(nonconformances.id, row!.id));
    expect(after).toMatchObject({ disposition: "use_as_is", approvedBy: qualityUser });
    await expect(step(pair.id, 2, at(HOUR))).resolves.toMatchObject({ nc: null });
  });

  test("scrapping one cabinet leaves its partner unpartnered; a new partner needs quality's sign-off and starts the route", async () => {
    const { pair, right } = await newPair();
    const { nc } = await step(pair.id, 1, T0, { platenC: "150", minutes: "22" });
    const [row] = await db().select().from(nonconformances).where(eq(nonconformances.code, nc!));
    await dispositionNc(db(), { ncId: row!.id, disposition: "scrap", scrapSide: "R", reason: "veneer blistered in the press" }, { id: qualityUser });
    const [p] = await db().select().from(items).where(eq(items.id, pair.id));
    expect(p!.state).toBe("unpartnered");
    const [r] = await db().select().from(items).where(eq(items.id, right.id));
    expect(r!.state).toBe("scrapped");
    const route = await pairRoute(db(), p!, at(HOUR));
    expect(route.cabinets.map((c) => c.side)).toEqual(["L"]);
    // The trace still shows the scrapped cabinet "ever", not now.
    const nowTrace = await traceBackward(db(), pair.id, { mode: "now" });
    expect(nowTrace.map((n) => n.identity)).not.toContain(right.identity);

    const [spare] = await makeLacquerCabinets(db(), { modelId: model.id, finishId: (await db().select().from(finishes)).find((f) => f.kind === "lacquer")!.id, count: 2 }, { id: cabinetUser });
    expect(await failureText(() => repartner(db(), { pairId: pair.id, cabinet: spare!.identity, reason: "lacquer cabinet offered" }, { id: qualityUser }))).toMatch(/model and finish/);
    const other = await newPair();
    const held = await db().select().from(links).where(sql`${links.childId} = ${other.right.id} AND ${links.endedAt} IS NULL`);
    expect(held).toHaveLength(1);
    expect(await failureText(() => repartner(db(), { pairId: pair.id, cabinet: other.right.identity, reason: "take from another pair" }, { id: qualityUser }))).toMatch(/already belongs to a pair/);
  });
});

describe("versions of the route", () => {
  test("a spec edit makes a new version; a pair already started keeps its own", async () => {
    const { pair } = await newPair();
    await step(pair.id, 1, T0);
    const v1 = (await currentSpec(db(), model.id))!;
    const steps = v1.steps.map((s) => (s.key === "trim" ? { ...s, readings: s.readings.map((r) => ({ ...r, absMax: 0.3 })) } : s));
    const v2 = await createSpecVersion(db(), { modelId: model.id, steps, note: "looser trim for a trial" }, { id: adminUser });
    expect(v2.version).toBe(v1.version + 1);
    // The started pair still trims to ±0.2 mm: 0.25 opens a nonconformance.
    const old = await step(pair.id, 2, at(HOUR), { deviationMm: "0.25" });
    expect(old.nc).not.toBeNull();
    // A pair starting now follows the new version: 0.25 is within ±0.3 mm.
    const fresh = await newPair();
    await step(fresh.pair.id, 1, at(2 * HOUR));
    await expect(step(fresh.pair.id, 2, at(3 * HOUR), { deviationMm: "0.25" })).resolves.toMatchObject({ nc: null });
    expect((await pairRoute(db(), fresh.pair)).spec.version).toBe(v2.version);
    expect(await failureText(() => db().run(sql`UPDATE process_specs SET note = 'x' WHERE id = ${v1.id}`))).toMatch(/new version/);
  });
});

describe("lacquer cabinets", () => {
  test("a lacquer cabinet from a batch walks the route on its own; two finished ones are paired at assembly", async () => {
    const lacquer = (await db().select().from(finishes)).find((f) => f.kind === "lacquer")!;
    const made = await makeLacquerCabinets(db(), { modelId: model.id, finishId: lacquer.id, count: 2 }, { id: cabinetUser });
    for (const cab of made) {
      let t = 0;
      const steps = (await currentSpec(db(), model.id))!.steps;
      for (const s of steps) {
        await step(cab.id, s.seq, at(t), undefined, ["L"]);
        t += s.holdAfter ? s.holdAfter.minutes * MIN : HOUR;
      }
      const [after] = await db().select().from(items).where(eq(items.id, cab.id));
      expect(after!.state).toBe("finished");
    }
    setClock(null);
    const { pairLacquerCabinets } = await import("@/lib/assembly");
    const { pair } = await pairLacquerCabinets(db(), { left: made[0]!.identity, right: made[1]!.identity }, { id: cabinetUser });
    expect(pair.identity).toMatch(new RegExp(`^P-${model.code}-`));
  });
});
