/**
 * Crossover boards: two for each pair, built at the bench from the quarter's component lots and
 * measured (`buildCrossover`, which registers a lot the first time a board takes from it), paired
 * left and right on their responses (`matchCrossovers`, `acceptCrossoverPlan`). Now and then a
 * board fails its part check and a third is built. A quarter's lots are used up when the next
 * quarter's arrive.
 */
import { acceptCrossoverPlan, buildCrossover, matchCrossovers } from "@/lib/lab/crossovers";
import { changeState, itemByIdentity } from "@/lib/genealogy/graph";
import { HOUR, MIN, plus, workday, yymm, type Rng } from "./basics";
import { boardParts, boardResponse, COMPONENT_CODES, LOT_VALUES, responseFile } from "./measurements";
import { setQueue, type PairPlan, type Plan } from "./plan";
import type { RefModel } from "./reference";

/** Lots of crossover components are bought about quarterly. */
const LOT_PERIOD_DAYS = 91;

/** The tightest drive-unit limit of the model, never looser than its finished-pair limit (as the lab's page proposes). */
export const boardLimit = (model: RefModel) => Math.min(...Object.values(model.limits), model.pairResponseLimitDb);

export function planCrossovers(plan: Plan, rng: Rng, pairs: PairPlan[], start: Date, now: Date): void {
  // The first lots arrive before the first board of the history is built.
  const first = plus(start, -20 * 24 * HOUR);
  const receipts: Date[] = [];
  for (let g = 0; workday(first, g * LOT_PERIOD_DAYS, 10) <= now; g++) receipts.push(workday(first, g * LOT_PERIOD_DAYS, 10));
  const lotCode = (g: number) => (type: keyof typeof COMPONENT_CODES, letter: string) => `LOT-${COMPONENT_CODES[type]}-${yymm(receipts[g]!)}-${letter}`;
  /** The newest quarter whose lots had all arrived (hence the hour's margin) by `d`. */
  const generation = (d: Date) => {
    let g = 0;
    while (g + 1 < receipts.length && plus(receipts[g + 1]!, HOUR) <= d) g++;
    return g;
  };

  receipts.slice(1).forEach((_, i) => {
    const usedUp = workday(first, (i + 1) * LOT_PERIOD_DAYS, 12);
    plan.add(usedUp, `lots of quarter ${i} used up`, async (ctx) => {
      await ctx.db.transaction(async (tx) => {
        for (const v of LOT_VALUES) {
          const lot = await itemByIdentity(tx, lotCode(i)(v.type, v.letter));
          if (lot?.state === "in_stock") await changeState(tx, lot, "used_up", { actorId: ctx.ref.actors.lab.id, station: "lab" });
        }
      });
    });
  });

  let n = 0;
  for (const p of pairs) {
    const built = p.t.crossovers;
    const lots = lotCode(generation(built));
    const boards: { at: Date; failing: boolean }[] = [
      ...(rng.chance(0.04) ? [{ at: plus(built, -20 * MIN), failing: true }] : []),
      { at: built, failing: false },
      { at: plus(built, 20 * MIN), failing: false },
    ];
    for (const b of boards) {
      const parts = boardParts(rng, p.model.code, lots, b.failing);
      const run = ++n;
      const response = { name: `board-${p.model.code}-${run}.txt`, text: responseFile(`crossover board for the ${p.model.code}, bench run ${run}`, boardResponse(rng, p.model)) };
      plan.add(b.at, `building a crossover board for ${p.key}`, async (ctx) => {
        await buildCrossover(ctx.db, { modelId: p.model.id, parts, response }, ctx.ref.actors.lab);
      });
    }
    plan.add(plus(built, HOUR), `pairing crossover boards for ${p.key}`, async (ctx) => {
      const limitDb = boardLimit(p.model);
      const view = await matchCrossovers(ctx.db, { modelId: p.model.id, limitDb });
      const best = view.plan.pairs[0];
      if (!best) throw new Error(`history seed: no two ${p.model.code} boards within ${limitDb} dB for ${p.key}`);
      const made = await acceptCrossoverPlan(ctx.db, { modelId: p.model.id, limitDb, pairs: [{ a: best.a, b: best.b }] }, ctx.ref.actors.lab);
      setQueue(ctx, `${p.model.code}:crossover`).push(...made);
    });
  }
}
