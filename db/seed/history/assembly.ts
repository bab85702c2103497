/**
 * Lacquered cabinets made two at a time (`makeLacquerCabinets`), each on the route alone until
 * assembly pairs them (`pairLacquerCabinets`); every pair built into its two speakers from the
 * oldest matched sets of its model (`buildSpeakers`); the final pair test (`recordFinalTest`), once
 * failed and reworked (`dispositionNc`). Two more lacquer cabinets wait to be paired when the demo
 * opens, and two are in the lacquer booth.
 */
import { buildSpeakers } from "@/lib/assembly";
import { makeLacquerCabinets, pairLacquerCabinets } from "@/lib/cabinets/lacquer";
import { recordFinalTest } from "@/lib/lab/final-test";
import { dispositionNc, openNonconformances } from "@/lib/route/nonconformances";
import { SIDES } from "@/lib/vocabulary/sides";
import { CROSSOVER_POSITION } from "@/lib/vocabulary/positions";
import { DAY, HOUR, MIN, plus, workday, type Rng } from "./basics";
import { finalResponses, responseFile } from "./measurements";
import { got, setQueue, type Ctx, type PairPlan, type Plan } from "./plan";
import type { RefFinish, RefModel } from "./reference";
import { planRoute } from "./route";
import { trimScans } from "./trim";

function planLacquerCabinets(plan: Plan, rng: Rng, key: string, model: RefModel, finish: RefFinish, press: Date): void {
  plan.add(plus(press, -HOUR), `making the lacquer cabinets of ${key}`, async (ctx) => {
    const [left, right] = await makeLacquerCabinets(ctx.db, { modelId: model.id, finishId: finish.id, count: 2 }, ctx.ref.actors.cabinet);
    ctx.items.set(`${key}:cab:L`, left!);
    ctx.items.set(`${key}:cab:R`, right!);
  });
  for (const side of SIDES) planRoute(plan, rng, { key: `${key}:cab:${side}`, sides: ["L"], press });
}

/** The cabinets' route and, for lacquer, their making and pairing. */
export function planCabinets(plan: Plan, rng: Rng, p: PairPlan): void {
  if (p.finish.kind === "veneer") {
    planRoute(plan, rng, { key: p.key, sides: ["L", "R"], press: p.t.press, openTrimNc: p.story.openTrimNc, polishUsedAsIs: p.story.polishUsedAsIs, filmSlipCorrected: p.story.filmSlipCorrected });
    return;
  }
  planLacquerCabinets(plan, rng, p.key, p.model, p.finish, p.t.press);
  plan.add(plus(p.t.assembly, -2 * HOUR), `pairing the lacquer cabinets of ${p.key}`, async (ctx) => {
    const { pair } = await pairLacquerCabinets(ctx.db, { left: got(ctx, `${p.key}:cab:L`).identity, right: got(ctx, `${p.key}:cab:R`).identity }, ctx.ref.actors.assembly);
    ctx.items.set(p.key, pair);
  });
}

const popSet = (ctx: Ctx, key: string, pair: string) => {
  const set = setQueue(ctx, key).shift();
  if (!set) throw new Error(`history seed: no matched ${key} set is reserved for ${pair}`);
  return set;
};

/** The build: each position takes the oldest reserved set of its part type for the model, the crossover likewise. */
export function planBuild(plan: Plan, p: PairPlan): void {
  plan.add(p.t.assembly, `building ${p.key}`, async (ctx) => {
    const scans: { side: "L" | "R"; slot: string; code: string }[] = [];
    for (const { position, partType } of p.model.positions) {
      const set = popSet(ctx, `${p.model.code}:${partType}`, p.key);
      scans.push({ side: "L", slot: position, code: set.left }, { side: "R", slot: position, code: set.right });
      ctx.notes.set(`${p.key}:unit:L:${position}`, set.left);
      ctx.notes.set(`${p.key}:unit:R:${position}`, set.right);
    }
    const boards = popSet(ctx, `${p.model.code}:crossover`, p.key);
    scans.push({ side: "L", slot: CROSSOVER_POSITION, code: boards.left }, { side: "R", slot: CROSSOVER_POSITION, code: boards.right });
    scans.push(...trimScans(ctx, p));
    const { speakers } = await buildSpeakers(ctx.db, { pairId: got(ctx, p.key).id, scans, inspection: { clean: true, inspected: true, note: "" } }, ctx.ref.actors.assembly);
    ctx.items.set(`${p.key}:spk:L`, speakers.L);
    ctx.items.set(`${p.key}:spk:R`, speakers.R);
  });
}

/** The final pair test; the one pair of the story fails first, is reworked and passes that afternoon. */
export function planFinalTest(plan: Plan, rng: Rng, p: PairPlan): void {
  const test = (at: Date, failing: boolean) => {
    const curves = finalResponses(rng, p.model, failing);
    plan.add(at, `final test of ${p.key}`, async (ctx) => {
      const [l, r] = [got(ctx, `${p.key}:spk:L`).identity, got(ctx, `${p.key}:spk:R`).identity];
      await recordFinalTest(
        ctx.db,
        { pair: got(ctx, p.key).identity, left: { name: `${l}-final.txt`, text: responseFile(`${l} finished`, curves.L) }, right: { name: `${r}-final.txt`, text: responseFile(`${r} finished`, curves.R) } },
        ctx.ref.actors.lab,
      );
    });
  };
  if (!p.story.failedFirstTest) return test(p.t.tested, false);
  test(plus(p.t.tested, -3 * HOUR), true);
  plan.add(plus(p.t.tested, -2 * HOUR), `quality's decision on ${p.key}`, async (ctx) => {
    const pairId = got(ctx, p.key).id;
    const open = (await openNonconformances(ctx.db)).find((n) => n.nc.pairId === pairId);
    if (!open) throw new Error(`history seed: ${p.key} has no open nonconformance after its test`);
    await dispositionNc(ctx.db, { ncId: open.nc.id, disposition: "rework", reason: "The right tweeter's level pad was on its wrong tap: set right, then test again." }, ctx.ref.actors.quality);
  });
  test(p.t.tested, false);
}

/** Lacquer cabinets in no pair when the demo opens: two finished and waiting, two between coats. */
export function planLacquerToday(plan: Plan, rng: Rng, models: RefModel[], finishes: RefFinish[], now: Date): void {
  const lacquers = finishes.filter((f) => f.kind === "lacquer");
  if (!lacquers.length || !models.length) return;
  const model = rng.pick(models);
  const finish = rng.pick(lacquers);
  planLacquerCabinets(plan, rng, "lacquer:waiting", model, finish, workday(now, -24, 8));
  planLacquerCabinets(plan, rng, "lacquer:booth", model, finish, plus(workday(now, -3, 8), rng.int(0, 2) * DAY + 10 * MIN));
}
