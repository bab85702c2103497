import { sql } from "drizzle-orm";
import { describe, expect, test } from "vitest";
import { getDb } from "@/db";
import type { Item, ItemKind } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { affectedBy } from "@/lib/genealogy/affected";
import { createItem, fit, removeFrom } from "@/lib/genealogy/graph";
import { SHARED_KINDS } from "@/lib/vocabulary/item-kinds";
import { randomInt, seededRandom } from "../fixtures/random";

const db = () => getDb();

// Layers from source to what is sold: a part is only ever fitted into a later layer, so no loop.
const LAYERS: ItemKind[][] = [
  ["maker_lot", "flitch", "component_lot"],
  ["unit_batch", "leaf"],
  ["drive_unit", "crossover", "cabinet"],
  ["speaker"],
  ["pair"],
  ["carton"],
];

/**
 * A random register: items in layers, each fitted into one to three random parents of a later layer
 * (one only for physical parts), then some links ended and some parts refitted elsewhere.
 */
async function randomRegister(seed: number): Promise<Item[]> {
  const r = seededRandom(seed);
  const made: { item: Item; layer: number }[] = [];
  let t = Date.UTC(2025, 0, 1);
  const at = () => new Date((t += 60_000));
  await db().transaction(async (tx) => {
    for (let layer = LAYERS.length - 1; layer >= 0; layer--) {
      for (let i = 0; i < randomInt(r, 2, 6); i++) {
        const kinds = LAYERS[layer]!;
        const kind = kinds[randomInt(r, 0, kinds.length - 1)]!;
        const item = await createItem(tx, { kind, identity: `R${seed}-${layer}-${i}`, state: "in_stock" }, { actorId: null, station: "seed", at: at() });
        made.push({ item, layer });
      }
    }
    const above = (layer: number) => made.filter((m) => m.layer > layer);
    const openParents = new Map<string, Item[]>();
    for (const { item, layer } of made) {
      const candidates = above(layer);
      if (candidates.length === 0 || r() < 0.15) continue;
      const shared = SHARED_KINDS.includes(item.kind);
      const wanted = shared ? randomInt(r, 1, 3) : 1;
      const parents: Item[] = [];
      for (let k = 0; k < wanted; k++) {
        const p = candidates[randomInt(r, 0, candidates.length - 1)]!.item;
        if (parents.some((x) => x.id === p.id)) continue;
        // A physical part takes a position of its own; a source shares one per parent.
        await fit(tx, { parent: p, child: item, position: shared ? `S${k}` : `P-${item.identity}` }, { actorId: null, station: "seed", at: at() });
        parents.push(p);
      }
      openParents.set(item.id, parents);
    }
    // History: some parts taken out, and some of those fitted somewhere else.
    for (const { item, layer } of made) {
      const parents = openParents.get(item.id) ?? [];
      if (parents.length === 0 || r() > 0.3) continue;
      const parent = parents[0]!;
      await removeFrom(tx, { parent, child: item }, { actorId: null, station: "seed", at: at(), reason: "test removal" });
      const candidates = above(layer).filter((m) => !parents.some((p) => p.id === m.item.id));
      if (candidates.length && r() < 0.5) {
        const p = candidates[randomInt(r, 0, candidates.length - 1)]!.item;
        await fit(tx, { parent: p, child: item, position: `Q-${item.identity}` }, { actorId: null, station: "seed", at: at() });
      }
    }
  });
  return made.map((m) => m.item);
}

/** The oracle: a plain walk up the open links, written without the holdings index or SQL recursion. */
async function walkUp(targetId: string): Promise<string[]> {
  const open = await db().all<{ parent_id: string; child_id: string }>(sql`SELECT parent_id, child_id FROM links WHERE ended_at IS NULL`);
  const kinds = new Map((await db().all<{ id: string; kind: string }>(sql`SELECT id, kind FROM items`)).map((i) => [i.id, i.kind]));
  const seen = new Set<string>();
  const visit = (id: string) => {
    if (seen.has(id)) return;
    seen.add(id);
    for (const l of open) if (l.child_id === id) visit(l.parent_id);
  };
  visit(targetId);
  return [...seen].filter((id) => kinds.get(id) === "speaker" || kinds.get(id) === "pair").sort();
}

describe("affectedBy", () => {
  test.each([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12])("seed %i: every item's affected speakers and pairs are what a plain walk of the open links finds", async (seed) => {
    const register = await randomRegister(seed);
    let nonEmpty = 0;
    for (const item of register) {
      const got = await affectedBy(db(), item.id);
      const expected = await walkUp(item.id);
      expect(got.map((a) => a.id).sort(), `seed ${seed}, ${item.identity}`).toEqual(expected);
      for (const a of got) {
        const [row] = await db().all<{ kind: string; state: string; identity: string }>(sql`SELECT kind, state, identity FROM items WHERE id = ${a.id}`);
        expect(a).toMatchObject(row!);
      }
      if (got.length) nonEmpty++;
    }
    // The generated register is not trivially empty above its parts.
    expect(nonEmpty).toBeGreaterThan(0);
  });

  test("an id the register does not know is refused, with a clear message", async () => {
    const e = await affectedBy(db(), "no-such-item").catch((x: unknown) => x);
    expect(e).toBeInstanceOf(AppError);
    expect((e as AppError).status).toBe(404);
    expect((e as AppError).message).toBe("That item is not in the register.");
  });
});
