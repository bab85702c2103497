/**
 * The veneer room: every flitch received (`receiveFlitch`), its leaves measured from the leaf
 * table's CSV (`importLeafRows`), defects noted (`noteDefect`), and each pair born the day before
 * its press by confirming its bookmatched run (`confirmRuns`), now and then with a reserve leaf.
 * One flitch, received two days before `now`, is measured and waits to be planned.
 */
import { confirmRuns, flitchView, importLeafRows, noteDefect, receiveFlitch } from "@/lib/veneer/flitches";
import type { DefectKind } from "@/lib/vocabulary/defects";
import { HOUR, MIN, plus, utcDay, workday, type Rng } from "./basics";
import { got, type Ctx, type PairPlan, type Plan } from "./plan";
import type { RefFinish, RefModel } from "./reference";

// Invented suppliers.
const VENEER_SUPPLIERS = ["Ashgrove Veneer Merchants", "Haldenwald Furniere", "Tallowcreek Timber"] as const;
const DEFECTS: { kind: DefectKind; note: string; atMm: boolean }[] = [
  { kind: "split", note: "split along the grain from the tip", atMm: false },
  { kind: "hole", note: "worm hole", atMm: true },
  { kind: "stain", note: "water stain across the leaf", atMm: true },
  { kind: "buckle", note: "buckled at the tip, would not lie flat in the press", atMm: false },
];

interface LeafSize {
  lengthMm: number;
  widthMm: number;
}

interface FlitchPlan {
  key: string;
  finish: RefFinish;
  received: Date;
  supplier: string;
  logReference: string;
  sizes: LeafSize[];
  /** Leaves found defective when measured (unusable; the runs go round them). */
  defects: Map<number, { kind: DefectKind; note: string; positionMm: number | null; stillUsable: boolean }>;
}

const leafId = async (ctx: Ctx, flitchKey: string, seq: number) => {
  const view = await flitchView(ctx.db, got(ctx, flitchKey).identity);
  const leaf = view?.leaves.find((l) => l.seq === seq);
  if (!leaf) throw new Error(`history seed: ${flitchKey} has no leaf ${seq}`);
  return leaf.id;
};

/** Receiving, measuring and noting the defects of one flitch. */
function planIntake(plan: Plan, f: FlitchPlan, measured: Date): void {
  plan.add(f.received, `receiving ${f.key}`, async (ctx) => {
    const intake = { finishId: f.finish.id, logReference: f.logReference, supplier: f.supplier, receivedOn: utcDay(f.received), leafThicknessMm: 0.6, leafCount: f.sizes.length };
    ctx.items.set(f.key, await receiveFlitch(ctx.db, intake, ctx.ref.actors.veneer));
  });
  plan.add(measured, `measuring the leaves of ${f.key}`, async (ctx) => {
    const rows = f.sizes.map((s, i) => ({ seq: i + 1, ...s, usable: true, defect: null }));
    await importLeafRows(ctx.db, got(ctx, f.key).id, rows, ctx.ref.actors.veneer);
  });
  for (const [seq, defect] of f.defects) {
    plan.add(plus(measured, seq * MIN), `noting a defect on ${f.key}/${seq}`, async (ctx) => {
      await noteDefect(ctx.db, await leafId(ctx, f.key, seq), defect, ctx.ref.actors.veneer);
    });
  }
}

const logReference = (rng: Rng) => `LOG-${rng.int(1000, 9899)}-${rng.pick(["A", "B", "C"])}`;

/** One flitch per species and month serves that month's veneered pairs, in pressing order. */
export function planFlitches(plan: Plan, rng: Rng, pairs: PairPlan[]): void {
  const groups = new Map<string, PairPlan[]>();
  for (const p of pairs) {
    if (p.finish.kind !== "veneer") continue;
    const key = `${p.finish.code}:${p.window}`;
    groups.set(key, [...(groups.get(key) ?? []), p]);
  }
  for (const [groupKey, group] of groups) {
    group.sort((a, b) => a.t.press.getTime() - b.t.press.getTime());
    const minLength = Math.max(...group.map((p) => p.model.minLeafLengthMm));
    const minWidth = Math.max(...group.map((p) => p.model.minLeafWidthMm));
    const length = minLength + rng.int(20, 140);
    const width = minWidth + rng.int(12, 60);
    const f: FlitchPlan = { key: `flitch:${groupKey}`, finish: group[0]!.finish, received: workday(group[0]!.t.press, -rng.int(8, 20), 10), supplier: rng.pick(VENEER_SUPPLIERS), logReference: logReference(rng), sizes: [], defects: new Map() };
    const leaf = () => f.sizes.push({ lengthMm: length + rng.int(-4, 4), widthMm: width + rng.int(-6, 6) });

    // Each pair takes a run of 2k leaves, sometimes with a reserve leaf after it for repairs; now
    // and then the leaf after a run is found defective, and the next run starts after it.
    const runs: { pair: PairPlan; left: number[]; right: number[]; reserve: number[] }[] = [];
    for (const p of group) {
      const first = f.sizes.length + 1;
      const k = p.model.leavesPerFace;
      for (let i = 0; i < 2 * k; i++) leaf();
      const run = { pair: p, left: Array.from({ length: k }, (_, i) => first + 2 * i), right: Array.from({ length: k }, (_, i) => first + 2 * i + 1), reserve: [] as number[] };
      if (rng.chance(0.4)) {
        leaf();
        run.reserve.push(f.sizes.length);
      }
      runs.push(run);
      if (rng.chance(0.2)) {
        leaf();
        const d = rng.pick(DEFECTS);
        f.defects.set(f.sizes.length, { kind: d.kind, note: d.note, positionMm: d.atMm ? rng.int(20, length - 20) : null, stillUsable: false });
      }
    }
    // The last leaves of a flitch taper: the final one is too short for any of its models.
    for (let i = rng.int(1, 2); i > 0; i--) leaf();
    f.sizes.push({ lengthMm: minLength - rng.int(20, 60), widthMm: width + rng.int(-6, 6) });

    planIntake(plan, f, workday(f.received, 1, 9));
    for (const run of runs) {
      // The run is confirmed the day before pressing: the pair and its two cabinets are born with
      // their leaves, the left face as cut and the right face turned over (the bookmatch).
      const { pair } = run;
      plan.add(plus(pair.t.press, -18 * HOUR), `confirming the run of ${pair.key}`, async (ctx) => {
        const [made] = await confirmRuns(
          ctx.db,
          { flitchId: got(ctx, f.key).id, modelId: pair.model.id, reservePerPair: run.reserve.length, runs: [{ left: run.left, right: run.right, reserve: run.reserve }] },
          ctx.ref.actors.veneer,
        );
        ctx.items.set(pair.key, made!.pair);
        ctx.items.set(`${pair.key}:cab:L`, made!.left);
        ctx.items.set(`${pair.key}:cab:R`, made!.right);
      });
    }
  }
}

/**
 * A flitch received two days ago, measured, with a split leaf and a knot noted, and not yet
 * planned: the veneer room's next job when the demo opens. Sized for the model with the fewest
 * leaves a face; its last two leaves are too short for it.
 */
export function planFreshFlitch(plan: Plan, rng: Rng, finishes: RefFinish[], models: RefModel[], now: Date): void {
  const finish = finishes.find((x) => x.kind === "veneer");
  const model = [...models].sort((a, b) => a.leavesPerFace - b.leavesPerFace)[0];
  if (!finish || !model) return;
  const received = workday(now, -2, 10);
  const length = model.minLeafLengthMm + rng.int(30, 90);
  const width = model.minLeafWidthMm + rng.int(15, 40);
  const f: FlitchPlan = {
    key: "flitch:fresh",
    finish,
    received,
    supplier: rng.pick(VENEER_SUPPLIERS),
    logReference: logReference(rng),
    sizes: Array.from({ length: 24 }, (_, i) => ({ lengthMm: i >= 22 ? model.minLeafLengthMm - rng.int(20, 60) : length + rng.int(-4, 4), widthMm: width + rng.int(-6, 6) })),
    defects: new Map([
      [9, { kind: "split" as const, note: "runs most of the leaf", positionMm: null, stillUsable: false }],
      [16, { kind: "knot" as const, note: "small, near the butt end", positionMm: 12, stillUsable: true }],
    ]),
  };
  planIntake(plan, f, plus(received, HOUR));
}
