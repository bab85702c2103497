import { and, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { finishes, items, leafAllocations, links, models, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { traceBackward, traceForward } from "@/lib/genealogy/trace";
import { confirmRuns, flitchView, importLeafRows, LeavesTakenError, measureLeaf, noteDefect, planView, receiveFlitch, releaseReserve, returnReserve, specFor } from "@/lib/veneer/flitches";
import { makeLacquerCabinets } from "@/lib/cabinets/lacquer";
import type { Actor } from "@/lib/vocabulary/actor";
import { failureText } from "./helpers";

const db = () => getDb();
let actor: Actor;
let walnut: typeof finishes.$inferSelect;
let lacquer: typeof finishes.$inferSelect;
let model: typeof models.$inferSelect;

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  const [u] = await db().select().from(users).where(eq(users.email, "veneer@demo.twinleaf.test"));
  actor = { id: u!.id };
  const all = await db().select().from(finishes);
  walnut = all.find((f) => f.kind === "veneer")!;
  lacquer = all.find((f) => f.kind === "lacquer")!;
  // The demo's two-way model: two leaves per face.
  model = (await db().select().from(models)).find((m) => m.leavesPerFace === 2)!;
});

async function newFlitch(leafCount: number) {
  const flitch = await receiveFlitch(
    db(),
    { finishId: walnut.id, logReference: "LOG-T-1", supplier: "Test supplier", receivedOn: "2026-11-30", leafThicknessMm: 0.6, leafCount },
    actor,
  );
  const view = (await flitchView(db(), flitch.identity))!;
  for (const leaf of view.leaves) {
    await measureLeaf(db(), leaf.id, { lengthMm: model.minLeafLengthMm + 20, widthMm: model.minLeafWidthMm + 10, usable: true }, actor);
  }
  return (await flitchView(db(), flitch.identity))!;
}

describe("flitch intake", () => {
  test("registers leaves 1…N in slicing order with identities under the flitch serial", async () => {
    const flitch = await receiveFlitch(db(), { finishId: walnut.id, logReference: "LOG-9", supplier: "S", receivedOn: "2026-11-02", leafThicknessMm: 0.6, leafCount: 12 }, actor);
    expect(flitch.identity).toMatch(new RegExp(`^F-${walnut.code}-26-\\d{5}-.$`));
    const view = (await flitchView(db(), flitch.identity))!;
    expect(view.leaves.map((l) => l.seq)).toEqual([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
    expect(view.leaves[2]!.identity).toBe(`${flitch.identity}/03`);
    expect(view.intake.leafThicknessMm).toBe(0.6);
  });

  test("a lacquer colour is refused as a species, and nothing is written", async () => {
    const before = await db().select({ n: sql<number>`count(*)` }).from(items);
    const msg = await failureText(() => receiveFlitch(db(), { finishId: lacquer.id, logReference: "X", supplier: "S", receivedOn: "2026-11-02", leafThicknessMm: 0.6, leafCount: 4 }, actor));
    expect(msg).toMatch(/lacquer colour/);
    const after = await db().select({ n: sql<number>`count(*)` }).from(items);
    expect(after[0]!.n).toBe(before[0]!.n);
  });

  test("the slicing order is fixed by the database", async () => {
    const view = await newFlitch(4);
    const msg = await failureText(() => db().run(sql`UPDATE veneer_leaves SET seq = 9 WHERE item_id = ${view.leaves[0]!.id}`));
    expect(msg).toMatch(/slicing order/);
  });
});

describe("confirming a plan", () => {
  test("two runs become two pairs: cabinets with serials, faces bookmatched, reserves held, leaves in the trace", async () => {
    const view = await newFlitch(12);
    await noteDefect(db(), view.leaves[6]!.id, { kind: "split", note: "end split", positionMm: 20, stillUsable: false }, actor);
    const redrawn = (await flitchView(db(), view.item.identity))!;
    const { plan } = planView(redrawn, specFor(model, 1));
    // Leaves 1–5 make a run of 4 + reserve; 7 is split; 8–12 make the second.
    expect(plan.runs).toEqual([
      { left: [1, 3], right: [2, 4], reserve: [5] },
      { left: [8, 10], right: [9, 11], reserve: [12] },
    ]);
    const made = await confirmRuns(db(), { flitchId: view.item.id, modelId: model.id, reservePerPair: 1, runs: plan.runs }, actor);
    expect(made).toHaveLength(2);
    const first = made[0]!;
    expect(first.pair.identity).toMatch(new RegExp(`^P-${model.code}-`));
    expect(first.left.identity).toMatch(new RegExp(`^C-${model.code}-`));
    const faces = await db().select().from(leafAllocations).where(and(eq(leafAllocations.pairId, first.pair.id), eq(leafAllocations.role, "face")));
    const byCabinet = (id: string) => faces.filter((f) => f.cabinetId === id).sort((a, b) => a.position!.localeCompare(b.position!));
    expect(byCabinet(first.left.id).map((f) => [f.position, f.orientation])).toEqual([["F1", "as_cut"], ["F2", "as_cut"]]);
    expect(byCabinet(first.right.id).map((f) => [f.position, f.orientation])).toEqual([["F1", "turned"], ["F2", "turned"]]);
    // The pair's trace reaches its four face leaves through its cabinets.
    const trace = await traceBackward(db(), first.pair.id, { mode: "now" });
    const leafIds = trace.filter((n) => n.kind === "leaf").map((n) => n.identity).sort();
    expect(leafIds).toEqual(["/01", "/02", "/03", "/04"].map((s) => `${view.item.identity}${s}`));
    // And a leaf traces forward to the pair.
    const up = await traceForward(db(), view.leaves[1]!.id, { mode: "now" });
    expect(up.map((n) => n.identity)).toContain(first.pair.identity);
    const after = (await flitchView(db(), view.item.identity))!;
    expect(after.leaves[4]!.allocation).toMatchObject({ role: "reserve", pair: first.pair.identity });
    expect(after.leaves[4]!.state).toBe("reserved");
    // What is left plans no further pair.
    expect(planView(after, specFor(model, 1)).plan.pairs).toBe(0);
  });

  test("a run that breaks the rules is refused with the reason and writes nothing", async () => {
    const view = await newFlitch(6);
    const msg = await failureText(() =>
      confirmRuns(db(), { flitchId: view.item.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 2], right: [3, 4], reserve: [] }] }, actor),
    );
    expect(msg).toMatch(/alternating/);
    const rows = await db().select().from(leafAllocations).innerJoin(items, eq(items.id, leafAllocations.leafId)).where(sql`${items.identity} LIKE ${view.item.identity + "/%"}`);
    expect(rows).toHaveLength(0);
  });

  test("two people confirming overlapping runs at once: exactly one succeeds, the other is told which leaves", async () => {
    const view = await newFlitch(8);
    const a = { flitchId: view.item.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] };
    const b = { flitchId: view.item.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [3, 5], right: [4, 6], reserve: [] }] };
    const results = await Promise.allSettled([confirmRuns(db(), a, actor), confirmRuns(db(), b, actor)]);
    const ok = results.filter((r) => r.status === "fulfilled");
    const failed = results.filter((r): r is PromiseRejectedResult => r.status === "rejected");
    expect(ok).toHaveLength(1);
    expect(failed).toHaveLength(1);
    expect(failed[0]!.reason).toBeInstanceOf(LeavesTakenError);
    expect((failed[0]!.reason as LeavesTakenError).taken.map((t) => t.seq)).toEqual([3, 4]);
    expect((failed[0]!.reason as Error).message).toMatch(/Leaves 3, 4 were taken/);
  });

  test("the database itself refuses a second face for a leaf and a second open promise", async () => {
    const view = await newFlitch(4);
    const [made] = await confirmRuns(db(), { flitchId: view.item.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, actor);
    const [face] = await db().select().from(leafAllocations).where(eq(leafAllocations.pairId, made!.pair.id)).limit(1);
    const msg = await failureText(() =>
      db().insert(leafAllocations).values({ leafId: face!.leafId, pairId: made!.pair.id, role: "face", cabinetId: made!.right.id, position: "F9", orientation: "turned", startedAt: new Date(), eventId: face!.eventId }),
    );
    expect(msg).toMatch(/UNIQUE/);
    expect(await failureText(() => db().run(sql`DELETE FROM leaf_allocations WHERE id = ${face!.id}`))).toMatch(/history/);
  });
});

describe("reserves", () => {
  test("a reserve leaf re-veneers a damaged face of its own pair and shows in the trace; another is returned", async () => {
    const view = await newFlitch(12);
    const [made] = await confirmRuns(db(), { flitchId: view.item.id, modelId: model.id, reservePerPair: 2, runs: [{ left: [1, 3], right: [2, 4], reserve: [5, 6] }] }, actor);
    const leaf = (seq: number) => view.leaves.find((l) => l.seq === seq)!;
    await releaseReserve(db(), { leafId: leaf(5).id, cabinetId: made!.right.id, position: "F2", reason: "face dented at the press" }, actor);
    const trace = await traceBackward(db(), made!.pair.id, { mode: "now" });
    const faceLeaves = trace.filter((n) => n.kind === "leaf").map((n) => n.identity.slice(-2)).sort();
    expect(faceLeaves).toEqual(["01", "02", "03", "05"]);
    const [open] = await db().select().from(links).where(and(eq(links.childId, leaf(5).id), sql`${links.endedAt} IS NULL`));
    expect(open!.position).toBe("F2");
    // The damaged leaf is spent for good: it can never face another cabinet.
    const after = (await flitchView(db(), view.item.identity))!;
    expect(after.leaves[3]!.spent).toBe(true);
    expect(after.leaves[3]!.state).toBe("scrapped");

    await returnReserve(db(), { leafId: leaf(6).id, reason: "pair passed final inspection" }, actor);
    const returned = (await flitchView(db(), view.item.identity))!;
    expect(returned.leaves[5]!.allocation).toBeNull();
    expect(returned.leaves[5]!.state).toBe("available");
    expect(await failureText(() => returnReserve(db(), { leafId: leaf(6).id, reason: "again" }, actor))).toMatch(/not held in reserve/);
  });

  test("a reserve cannot go into another pair's cabinet", async () => {
    const view = await newFlitch(10);
    const [p1, p2] = await confirmRuns(
      db(),
      { flitchId: view.item.id, modelId: model.id, reservePerPair: 1, runs: [{ left: [1, 3], right: [2, 4], reserve: [5] }, { left: [6, 8], right: [7, 9], reserve: [10] }] },
      actor,
    );
    const reserve = view.leaves.find((l) => l.seq === 5)!;
    const msg = await failureText(() => releaseReserve(db(), { leafId: reserve.id, cabinetId: p2!.left.id, position: "F1", reason: "test" }, actor));
    expect(msg).toMatch(/another pair/);
    expect(p1).toBeDefined();
  });
});

describe("the leaf table", () => {
  test("a CSV import applies every row in one go; a leaf already on a cabinet refuses the whole import", async () => {
    const view = await newFlitch(4);
    const rows = [1, 2, 3, 4].map((seq) => ({ seq, lengthMm: 500 + seq, widthMm: 200, usable: seq !== 2, defect: seq === 2 ? { kind: "knot" as const, note: "loose", positionMm: 120 } : null }));
    expect(await importLeafRows(db(), view.item.id, rows, actor)).toEqual({ changed: 4, defects: 1 });
    const after = (await flitchView(db(), view.item.identity))!;
    expect(after.leaves.map((l) => l.lengthMm)).toEqual([501, 502, 503, 504]);
    expect(after.leaves[1]!.defects).toMatchObject([{ kind: "knot", positionMm: 120 }]);

    const other = await newFlitch(4);
    await confirmRuns(db(), { flitchId: other.item.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, actor);
    const msg = await failureText(() => importLeafRows(db(), other.item.id, [1, 2].map((seq) => ({ seq, lengthMm: 999, widthMm: 999, usable: true, defect: null })), actor));
    expect(msg).toMatch(/already faces/);
    const unchanged = (await flitchView(db(), other.item.identity))!;
    expect(unchanged.leaves[0]!.lengthMm).toBe(model.minLeafLengthMm + 20);
  });
});

describe("lacquered cabinets", () => {
  test("a batch makes cabinets without leaves or a pair; a veneer species is refused", async () => {
    const made = await makeLacquerCabinets(db(), { modelId: model.id, finishId: lacquer.id, count: 3 }, actor);
    expect(made).toHaveLength(3);
    expect(new Set(made.map((c) => c.identity)).size).toBe(3);
    const held = await db().select().from(links).where(eq(links.childId, made[0]!.id));
    expect(held).toHaveLength(0);
    expect(await failureText(() => makeLacquerCabinets(db(), { modelId: model.id, finishId: walnut.id, count: 2 }, actor))).toMatch(/is a veneer/);
  });
});
