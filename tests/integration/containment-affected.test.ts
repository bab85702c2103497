/**
 * The affected list of raiseContainment checked against a plain recursive walk of the `links`
 * table written here, on random registers (the generator idea of affected.test.ts): open links
 * only, never the holdings index or SQL recursion. What is listed follows lib/containments/affected.ts's
 * documented rule: the target and everything holding it; for a pair target, its speakers too; of
 * those, pairs and speakers always, and a part (cabinet, drive unit, crossover, leaf) only when no
 * speaker or pair holds it; scrapped things never. Each row's group follows its pair's state.
 */
import { sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import type { ItemKind } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { raiseContainment, TARGET_KINDS } from "@/lib/containments";
import { randomInt, seededRandom } from "../fixtures/random";
import { randomRegister as randomRegisterOf } from "../fixtures/random-register";

const db = () => getDb();
const quality = { id: "walk-quality" };
const DEALERS = ["walk-dealer-1", "walk-dealer-2"];
/** Every group the seeds' lists reached, so the last test can tell the generator covers them all. */
const groupsSeen = new Set<string>();

beforeAll(async () => {
  await db().run(sql`INSERT INTO users (id, email, name) VALUES (${quality.id}, 'walk-quality@test.invalid', 'Walk quality')`);
  for (const [i, id] of DEALERS.entries()) {
    await db().run(sql`INSERT INTO dealers (id, code, name, city, country, email) VALUES (${id}, ${`WDL${i + 1}`}, ${`Walk dealer ${i + 1}`}, 'Town', 'GB', ${`d${i}@test.invalid`})`);
  }
});

// Layers from source to what ships: a part is only ever fitted into a later layer, so no loop.
const LAYERS: ItemKind[][] = [
  ["maker_lot", "flitch", "component_lot"],
  ["unit_batch", "leaf"],
  ["drive_unit", "crossover", "cabinet"],
  ["speaker"],
  ["pair"],
  ["carton"],
  ["shipment"],
];

/** States each kind is given at random: the pair's decide the group, and any item may be scrapped. */
const STATES: Partial<Record<ItemKind, string[]>> = {
  pair: ["planned", "in_progress", "built", "packed", "shipped", "scrapped"],
  cabinet: ["in_progress", "in_stock", "fitted", "scrapped"],
  speaker: ["built", "fitted", "scrapped"],
  drive_unit: ["in_stock", "fitted", "scrapped"],
  crossover: ["in_stock", "fitted", "scrapped"],
  leaf: ["in_stock", "fitted", "scrapped"],
};

/** A random register of these layers with random states; shipments go to one of two dealers. */
const randomRegister = (seed: number) =>
  randomRegisterOf(db(), seed, {
    layers: LAYERS,
    identity: (layer, i) => `CW${seed}L${layer}N${i}`,
    facts: (kind, r) => {
      const states = STATES[kind] ?? ["in_stock"];
      return { state: states[randomInt(r, 0, states.length - 1)]!, dealerId: kind === "shipment" ? DEALERS[randomInt(r, 0, 1)]! : null };
    },
  });

interface Expected {
  identity: string;
  kind: string;
  group: string;
  dealerId: string | null;
}

/** The oracle: walks the open links up from the target in plain code, then applies the listing rule. */
async function expectedAffected(targetId: string): Promise<Expected[]> {
  const open = await db().all<{ parent_id: string; child_id: string }>(sql`SELECT parent_id, child_id FROM links WHERE ended_at IS NULL`);
  const all = await db().all<{ id: string; kind: string; identity: string; state: string; dealer_id: string | null }>(sql`SELECT id, kind, identity, state, dealer_id FROM items`);
  const byId = new Map(all.map((i) => [i.id, i]));
  const up = (id: string, seen = new Set<string>()): Set<string> => {
    for (const l of open) {
      if (l.child_id === id && !seen.has(l.parent_id)) {
        seen.add(l.parent_id);
        up(l.parent_id, seen);
      }
    }
    return seen;
  };
  const target = byId.get(targetId)!;
  const candidates = new Set([targetId, ...up(targetId)]);
  if (target.kind === "pair") for (const l of open) if (l.parent_id === targetId && byId.get(l.child_id)!.kind === "speaker") candidates.add(l.child_id);

  const out: Expected[] = [];
  for (const id of candidates) {
    const item = byId.get(id)!;
    if (!["pair", "speaker", "cabinet", "drive_unit", "crossover", "leaf"].includes(item.kind) || item.state === "scrapped") continue;
    const holders = [...up(id)].map((h) => byId.get(h)!);
    const whole = item.kind === "pair" || item.kind === "speaker";
    if (!whole && holders.some((h) => h.kind === "pair" || h.kind === "speaker")) continue;
    const pair = item.kind === "pair" ? item : holders.find((h) => h.kind === "pair");
    let group: string;
    let dealerId: string | null = null;
    if (pair) {
      group = pair.state === "shipped" ? "shipped" : pair.state === "packed" ? "packed" : "in_build";
      if (group === "shipped") dealerId = [...up(pair.id)].map((h) => byId.get(h)!).find((h) => h.kind === "shipment")?.dealer_id ?? null;
    } else {
      group = item.kind === "cabinet" && item.state === "in_progress" ? "in_build" : "in_stock";
    }
    out.push({ identity: item.identity, kind: item.kind, group, dealerId });
  }
  return out.sort((a, b) => a.identity.localeCompare(b.identity));
}

describe("raiseContainment against a plain walk of the links", () => {
  test.each([101, 102, 103, 104, 105, 106, 107, 108])("seed %i: every target's affected list is what the walk finds, grouped by its pair's state", async (seed) => {
    const register = await randomRegister(seed);
    const r = seededRandom(seed * 7919);
    const targets = register.filter((i) => TARGET_KINDS.includes(i.kind));
    let raised = 0;
    // Every target of the register, in a random order (so the containments' codes interleave).
    for (const item of [...targets].sort(() => r() - 0.5)) {
      const expected = await expectedAffected(item.id);
      const got = await raiseContainment(db(), { target: item.identity, reason: "Random walk check", severity: "minor" }, quality).catch((e: unknown) => e);
      if (expected.length === 0) {
        // Nothing to contain: refused in words, nothing written.
        expect(got, `seed ${seed}, ${item.identity}`).toBeInstanceOf(AppError);
        expect((got as AppError).status).toBe(409);
        continue;
      }
      expect(got, `seed ${seed}, ${item.identity}: ${String(got)}`).not.toBeInstanceOf(Error);
      const rows = (got as Awaited<ReturnType<typeof raiseContainment>>).affected
        .map((a) => ({ identity: a.identity, kind: a.kind, group: a.group, dealerId: a.dealerId }))
        .sort((a, b) => a.identity.localeCompare(b.identity));
      expect(rows, `seed ${seed}, ${item.identity}`).toEqual(expected);
      raised++;
      for (const x of rows) groupsSeen.add(x.group);
    }
    // The generated register is not trivially empty above its parts.
    expect(raised).toBeGreaterThan(0);
  });

  test("the seeds between them reach every group, so each group's rule was checked", () => {
    expect([...groupsSeen].sort()).toEqual(["in_build", "in_stock", "packed", "shipped"]);
  });
});
