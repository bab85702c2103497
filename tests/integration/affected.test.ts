import { sql } from "drizzle-orm";
import { describe, expect, test } from "vitest";
import { getDb } from "@/db";
import type { ItemKind } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { affectedBy } from "@/lib/genealogy/affected";
import { randomRegister as randomRegisterOf } from "../fixtures/random-register";

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

/** A random register of these layers (tests/fixtures/random-register.ts). */
const randomRegister = (seed: number) => randomRegisterOf(db(), seed, { layers: LAYERS, identity: (layer, i) => `R${seed}-${layer}-${i}` });

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
