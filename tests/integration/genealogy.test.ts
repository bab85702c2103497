import type { Station } from "@/lib/vocabulary/stations";
import { sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { links, type Item } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { createItem, fit, removeFrom } from "@/lib/genealogy/graph";
import { holderView, shippedAt, toTree, traceBackward, traceForward, type TraceMoment } from "@/lib/genealogy/trace";
import { failureText } from "./helpers";

const by = (at: string, station: Station = "assembly") => ({ actorId: null, station, at: new Date(at) });
const db = () => getDb();

// A small invented register: one pair, two speakers, a shared capacitor lot in both crossovers,
// shipped; later a tweeter replaced at the service desk.
let pair: Item, left: Item, right: Item, tweeterL: Item, tweeterR: Item, spare: Item, xoL: Item, xoR: Item, lot: Item, carton: Item, shipment: Item;

async function make(kind: Item["kind"], identity: string, state = "fitted") {
  return db().transaction((tx) => createItem(tx, { kind, identity, state }, by("2025-01-01T08:00:00Z")));
}

beforeAll(async () => {
  pair = await make("pair", "P-T-1");
  left = await make("speaker", "S-T-L");
  right = await make("speaker", "S-T-R");
  tweeterL = await make("drive_unit", "D-T-1");
  tweeterR = await make("drive_unit", "D-T-2");
  spare = await make("drive_unit", "D-T-3", "in_stock");
  xoL = await make("crossover", "X-T-1");
  xoR = await make("crossover", "X-T-2");
  lot = await make("component_lot", "LOT-CAP-1");
  carton = await make("carton", "K-T-1");
  shipment = await make("shipment", "H-T-1", "shipped");
  await db().transaction(async (tx) => {
    await fit(tx, { parent: left, child: tweeterL, position: "T" }, by("2025-02-01T10:00:00Z"));
    await fit(tx, { parent: right, child: tweeterR, position: "T" }, by("2025-02-01T10:05:00Z"));
    await fit(tx, { parent: left, child: xoL, position: "XO" }, by("2025-02-01T10:10:00Z"));
    await fit(tx, { parent: right, child: xoR, position: "XO" }, by("2025-02-01T10:15:00Z"));
    await fit(tx, { parent: xoL, child: lot, position: "C1" }, by("2025-01-20T09:00:00Z"));
    await fit(tx, { parent: xoR, child: lot, position: "C1" }, by("2025-01-20T09:05:00Z"));
    await fit(tx, { parent: pair, child: left, position: "L" }, by("2025-02-02T09:00:00Z"));
    await fit(tx, { parent: pair, child: right, position: "R" }, by("2025-02-02T09:00:00Z"));
    await fit(tx, { parent: carton, child: pair, position: "PAIR" }, by("2025-02-10T09:00:00Z", "packing"));
    await fit(tx, { parent: shipment, child: carton, position: "1" }, by("2025-02-11T09:00:00Z", "packing"));
  });
  await db().transaction(async (tx) => {
    await removeFrom(tx, { parent: left, child: tweeterL }, { ...by("2026-03-01T12:00:00Z", "service"), reason: "no output above 3 kHz" });
    await fit(tx, { parent: left, child: spare, position: "T" }, by("2026-03-01T12:05:00Z", "service"));
  });
});

const ids = (nodes: { identity: string }[]) => nodes.map((n) => n.identity).sort();

describe("trace backward", () => {
  test("now: the replacement tweeter, not the failed one", async () => {
    const nodes = await traceBackward(db(), pair.id, { mode: "now" });
    expect(ids(nodes)).toEqual(["D-T-2", "D-T-3", "LOT-CAP-1", "LOT-CAP-1", "P-T-1", "S-T-L", "S-T-R", "X-T-1", "X-T-2"]);
    expect(nodes[0]!.identity).toBe("P-T-1");
  });

  test("as built (when it shipped): the original tweeter", async () => {
    const shipped = await shippedAt(db(), pair.id);
    expect(shipped?.toISOString()).toBe("2025-02-11T09:00:00.000Z");
    const nodes = await traceBackward(db(), pair.id, { mode: "at", at: shipped! });
    expect(ids(nodes)).toContain("D-T-1");
    expect(ids(nodes)).not.toContain("D-T-3");
  });

  test("as of a date before the speakers were paired: the pair was empty", async () => {
    const nodes = await traceBackward(db(), pair.id, { mode: "at", at: new Date("2025-02-01T23:00:00Z") });
    expect(ids(nodes)).toEqual(["P-T-1"]);
  });

  test("ever: both tweeters, the removed one marked ended; the tree puts them under the left speaker", async () => {
    const nodes = await traceBackward(db(), pair.id, { mode: "ever" });
    const removed = nodes.find((n) => n.identity === "D-T-1");
    expect(removed?.endedAt?.toISOString()).toBe("2026-03-01T12:00:00.000Z");
    const tree = toTree(nodes)!;
    const leftNode = tree.children.find((c) => c.position === "L")!;
    expect(leftNode.children.filter((c) => c.position === "T").map((c) => c.identity).sort()).toEqual(["D-T-1", "D-T-3"]);
  });
});

describe("trace forward", () => {
  test("a lot reaches both crossovers, both speakers, the pair, the carton and the shipment once each", async () => {
    const nodes = await traceForward(db(), lot.id, { mode: "now" });
    expect(ids(nodes)).toEqual(["H-T-1", "K-T-1", "LOT-CAP-1", "P-T-1", "S-T-L", "S-T-R", "X-T-1", "X-T-2"]);
  });

  test("the failed tweeter was in the shipped pair as of shipping, and in nothing now", async () => {
    expect(ids(await traceForward(db(), tweeterL.id, { mode: "now" }))).toEqual(["D-T-1"]);
    const then = await traceForward(db(), tweeterL.id, { mode: "at", at: new Date("2025-06-01T00:00:00Z") });
    expect(ids(then)).toEqual(["D-T-1", "H-T-1", "K-T-1", "P-T-1", "S-T-L"]);
  });
});

describe("what the item page shows of the holders", () => {
  // The page reads "now" from the holdings index without fetching every holder; it must say what
  // the whole forward trace says: the counts by kind, the same first rows, the same shipments.
  const moments: TraceMoment[] = [{ mode: "now" }, { mode: "at", at: new Date("2025-06-01T00:00:00Z") }];
  test.each(moments)("$mode: the same as the whole forward trace, in its order", async (moment) => {
    for (const item of [lot, tweeterL, xoL, pair]) {
      const all = (await traceForward(db(), item.id, moment)).slice(1);
      for (const rows of [0, 2, 100]) {
        const view = await holderView(db(), item.id, moment, rows);
        expect(view.count).toBe(all.length);
        expect(view.first).toEqual(all.slice(0, rows));
        expect(view.shipments).toEqual(all.filter((h) => h.kind === "shipment"));
        const kinds = [...new Set(all.map((h) => h.kind))];
        expect(view.byKind).toEqual(kinds.map((kind) => ({ kind, n: all.filter((h) => h.kind === kind).length })));
      }
    }
  });

  test("a lot in both crossovers of a shipped pair: counted by kind, nearest first", async () => {
    const view = await holderView(db(), lot.id, { mode: "now" }, 4);
    expect(view.byKind).toEqual([
      { kind: "crossover", n: 2 },
      { kind: "speaker", n: 2 },
      { kind: "pair", n: 1 },
      { kind: "carton", n: 1 },
      { kind: "shipment", n: 1 },
    ]);
    expect(view.first.map((h) => h.identity)).toEqual(["X-T-1", "X-T-2", "S-T-L", "S-T-R"]);
    expect(view.shipments.map((h) => h.identity)).toEqual(["H-T-1"]);
  });
});

describe("the graph's guarantees", () => {
  test("a part cannot sit in two parents at once (schema index), and the message names where it is", async () => {
    const other = await make("speaker", "S-T-X");
    const err = await db().transaction((tx) => fit(tx, { parent: other, child: tweeterR, position: "T" }, by("2026-04-01T00:00:00Z"))).catch((e) => e);
    expect(err).toBeInstanceOf(AppError);
    expect((err as AppError).message).toBe("D-T-2 already sits in S-T-R at T.");
  });

  test("two fits of the same part at the same moment: exactly one succeeds", async () => {
    const a = await make("speaker", "S-T-A");
    const b = await make("speaker", "S-T-B");
    const unit = await make("drive_unit", "D-T-9", "in_stock");
    const results = await Promise.allSettled(
      [a, b].map((parent) => db().transaction((tx) => fit(tx, { parent, child: unit, position: "T" }, by("2026-04-02T00:00:00Z")))),
    );
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    expect(results.filter((r) => r.status === "rejected")).toHaveLength(1);
  });

  test("a lot may sit in many crossovers at once", async () => {
    const xo = await make("crossover", "X-T-3");
    await db().transaction((tx) => fit(tx, { parent: xo, child: lot, position: "C1" }, by("2026-04-03T00:00:00Z")));
    expect(ids(await traceForward(db(), lot.id))).toContain("X-T-3");
  });

  test("a link that would make a loop is refused", async () => {
    const err = await db().transaction((tx) => fit(tx, { parent: tweeterR, child: pair, position: "X" }, by("2026-04-04T00:00:00Z"))).catch((e) => e);
    expect(err).toBeInstanceOf(AppError);
    expect((err as AppError).message).toMatch(/loop/);
    const self = await db().transaction((tx) => fit(tx, { parent: pair, child: pair, position: "X" }, by("2026-04-04T00:00:00Z"))).catch((e) => e);
    expect((self as AppError).message).toMatch(/itself/);
  });

  test("the shared flag cannot be forged to put a drive unit in two parents", async () => {
    const text = await failureText(() =>
      db().run(sql`INSERT INTO links (parent_id, parent_kind, parent_identity, child_id, position, shared, started_at, fit_event_id)
                   VALUES (${xoR.id}, 'crossover', 'X-T-2', ${tweeterR.id}, 'Z', 1, 0, (SELECT max(id) FROM events))`),
    );
    expect(text).toMatch(/shared must be true exactly when the child is a lot/);
  });

  test("a link's copy of its parent's kind and identity must be the parent's own, and identities never change", async () => {
    const forged = await failureText(() =>
      db().run(sql`INSERT INTO links (parent_id, parent_kind, parent_identity, child_id, position, shared, started_at, fit_event_id)
                   VALUES (${xoR.id}, 'shipment', 'H-ELSEWHERE', ${lot.id}, 'C9', 1, 0, (SELECT max(id) FROM events))`),
    );
    expect(forged).toMatch(/parent item's own/);
    expect(await failureText(() => db().run(sql`UPDATE items SET identity = 'P-T-9' WHERE id = ${pair.id}`))).toMatch(/never change/);
    expect(await failureText(() => db().run(sql`UPDATE items SET kind = 'carton' WHERE id = ${pair.id}`))).toMatch(/never change/);
  });

  test("links are history: never deleted, and an ended link cannot be changed", async () => {
    expect(await failureText(() => db().delete(links).where(sql`1 = 1`))).toMatch(/links are history/);
    expect(await failureText(() => db().run(sql`UPDATE links SET ended_at = ended_at + 1 WHERE ended_at IS NOT NULL`))).toMatch(/links are history/);
    expect(await failureText(() => db().run(sql`UPDATE links SET position = 'Q' WHERE ended_at IS NULL`))).toMatch(/links are history/);
  });

  test("removing a part that is not there is refused", async () => {
    const err = await db().transaction((tx) => removeFrom(tx, { parent: left, child: tweeterL }, { ...by("2026-05-01T00:00:00Z", "service"), reason: "again" })).catch((e) => e);
    expect((err as AppError).status).toBe(409);
  });
});

describe("the holdings index", () => {
  // Recomputed from the links alone with one recursive query (a path a row), independently of
  // the bookkeeping in fit/removeFrom.
  const recomputed = () =>
    db().all<{ item_id: string; holder_id: string; paths: number }>(sql`
      WITH RECURSIVE up(item_id, holder_id) AS (
        SELECT child_id, parent_id FROM links WHERE ended_at IS NULL
        UNION ALL
        SELECT up.item_id, l.parent_id FROM up JOIN links l ON l.child_id = up.holder_id AND l.ended_at IS NULL
      )
      SELECT item_id, holder_id, count(*) AS paths FROM up GROUP BY item_id, holder_id ORDER BY item_id, holder_id`);
  const kept = () => db().all<{ item_id: string; holder_id: string; paths: number }>(sql`SELECT item_id, holder_id, paths FROM holdings ORDER BY item_id, holder_id`);

  test("after every fit and removal above, it equals the open links' paths, counted", async () => {
    expect(await kept()).toEqual(await recomputed());
  });

  test("a lot reaches the pair through both speakers: two paths; removing one speaker leaves one", async () => {
    const [row] = await db().all<{ paths: number }>(sql`SELECT paths FROM holdings WHERE item_id = ${lot.id} AND holder_id = ${pair.id}`);
    expect(row?.paths).toBe(2);
    await db().transaction((tx) => removeFrom(tx, { parent: pair, child: right }, { ...by("2026-06-01T00:00:00Z", "service"), reason: "speaker back for inspection" }));
    const [after] = await db().all<{ paths: number }>(sql`SELECT paths FROM holdings WHERE item_id = ${lot.id} AND holder_id = ${pair.id}`);
    expect(after?.paths).toBe(1);
    expect(await kept()).toEqual(await recomputed());
    expect(ids(await traceForward(db(), tweeterR.id))).toEqual(["D-T-2", "S-T-R"]);
    await db().transaction((tx) => fit(tx, { parent: pair, child: right, position: "R" }, by("2026-06-02T00:00:00Z", "service")));
    expect(await kept()).toEqual(await recomputed());
    expect(ids(await traceForward(db(), tweeterR.id))).toEqual(["D-T-2", "H-T-1", "K-T-1", "P-T-1", "S-T-R"]);
  });

  test("the forward trace now (from holdings) and as of this moment (walking links) agree", async () => {
    const now = await traceForward(db(), lot.id, { mode: "now" });
    const atNow = await traceForward(db(), lot.id, { mode: "at", at: new Date("2100-01-01T00:00:00Z") });
    expect(now).toEqual(atNow);
  });
});

describe("shipped at: read from the holdings index and the ended links", () => {
  // The plain definition: walk every link up, open or ended, and take the first fitting into a shipment.
  const walked = async (itemId: string) => {
    const [row] = await db().all<{ at: number | null }>(sql`
      WITH RECURSIVE up(id) AS (SELECT ${itemId} UNION SELECT l.parent_id FROM links l JOIN up ON l.child_id = up.id)
      SELECT min(l.started_at) AS at FROM up JOIN links l ON l.child_id = up.id WHERE l.parent_kind = 'shipment'`);
    return row?.at === null || row?.at === undefined ? null : new Date(Number(row.at)).toISOString();
  };
  const items = () => ({ pair, left, right, tweeterL, tweeterR, spare, xoL, xoR, lot, carton, shipment });

  // Expected values: the fittings made in beforeAll (the carton went into the shipment on
  // 2025-02-11 09:00); the failed tweeter D-T-1 left the left speaker after shipping, so it
  // shipped with it; the spare was fitted later still, so it shipped then too, inside the pair.
  test.each([
    ["pair", "2025-02-11T09:00:00.000Z"],
    ["left", "2025-02-11T09:00:00.000Z"],
    ["tweeterL", "2025-02-11T09:00:00.000Z"],
    ["spare", "2025-02-11T09:00:00.000Z"],
    ["lot", "2025-02-11T09:00:00.000Z"],
    ["carton", "2025-02-11T09:00:00.000Z"],
    ["shipment", null],
  ] as const)("%s: %s, as the walk over every link finds", async (name, expected) => {
    const item = items()[name];
    expect((await shippedAt(db(), item.id))?.toISOString() ?? null).toBe(expected);
    expect(await walked(item.id)).toBe(expected);
  });

  test("a part taken out of a shipped pair and fitted into an unshipped speaker keeps its first shipment", async () => {
    const other = await make("speaker", "S-T-SHIP-OTHER", "fitted");
    const [row] = await db().all<{ id: string }>(sql`SELECT id FROM items WHERE identity = 'D-T-3'`);
    await db().transaction(async (tx) => {
      await removeFrom(tx, { parent: left, child: spare }, { ...by("2026-07-01T12:00:00Z", "service"), reason: "moved for a test" });
      await fit(tx, { parent: other, child: spare, position: "T" }, by("2026-07-01T12:05:00Z", "service"));
    });
    expect((await shippedAt(db(), row!.id))?.toISOString()).toBe(await walked(row!.id));
    expect(await shippedAt(db(), other.id)).toBeNull();
  });
});
