/**
 * Containments on the demo register: raising one lists every serial holding the target, grouped by
 * where it is; holds and quarantine follow from the list; serials are worked through; notices go
 * through the outbox; the containment closes only when every serial is dispositioned.
 */
import { eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { containmentItems, containments, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { AppError } from "@/lib/auth/errors";
import { closeContainment, containmentDetail, holdsOn, moveAffected, raiseContainment, sendNotices } from "@/lib/containments";

const db = () => getDb();
const userId = async (email: string) => (await db().select().from(users).where(eq(users.email, email)))[0]!.id;
let quality = { id: "" };

beforeAll(async () => {
  await seedDemo(db(), { months: 6 });
  quality = { id: await userId("quality@demo.twinleaf.test") };
  // Seeding six months takes longer than vitest's 10 s default on a busy machine, as elsewhere.
}, 120_000);

const count = async (table: string) => Number((await db().all<{ n: number }>(sql.raw(`SELECT count(*) AS n FROM ${table}`)))[0]!.n);

/** Every item that holds `id` through open links, walked here link by link, independently of holdings. */
async function walkUp(id: string): Promise<Set<string>> {
  const seen = new Set<string>([id]);
  let frontier = [id];
  while (frontier.length) {
    const next: string[] = [];
    for (const child of frontier) {
      const parents = await db().all<{ parent_id: string }>(sql`SELECT parent_id FROM links WHERE child_id = ${child} AND ended_at IS NULL`);
      for (const p of parents) {
        if (seen.has(p.parent_id)) continue;
        seen.add(p.parent_id);
        next.push(p.parent_id);
      }
    }
    frontier = next;
  }
  return seen;
}

describe("raising a containment on a component lot of the demo", () => {
  test("lists exactly the speakers and pairs whose parts hold the lot, grouped by their pair's state, and writes nothing on bad input", async () => {
    const [lot] = await db().all<{ id: string; identity: string }>(sql`
      SELECT i.id, i.identity FROM items i WHERE i.kind = 'component_lot'
      ORDER BY (SELECT count(DISTINCT p.state) FROM holdings h JOIN items p ON p.id = h.holder_id WHERE h.item_id = i.id AND h.holder_kind = 'pair') DESC,
               (SELECT count(*) FROM holdings h WHERE h.item_id = i.id) DESC LIMIT 1`);
    const before = [await count("containments"), await count("containment_items"), await count("events")];
    for (const bad of [
      { target: "NO-SUCH-LOT-1", reason: "x", severity: "major", field: "target" },
      { target: lot!.identity, reason: "  ", severity: "major", field: "reason" },
      { target: lot!.identity, reason: "ESR high", severity: "enormous", field: "severity" },
      { target: { station: "press", from: "2020-01-01", to: "2020-01-02" }, reason: "x", severity: "minor", field: "from" },
      { target: { station: "press", from: "2026-03-05", to: "2026-03-01" }, reason: "x", severity: "minor", field: "to" },
    ]) {
      const e = await raiseContainment(db(), bad, quality).catch((x: unknown) => x);
      expect(e, JSON.stringify(bad)).toBeInstanceOf(AppError);
      expect((e as AppError).status).toBeLessThan(500);
      expect(Object.keys((e as AppError).fieldErrors ?? {}), JSON.stringify(bad)).toContain(bad.field);
    }
    expect([await count("containments"), await count("containment_items"), await count("events")]).toEqual(before);

    const raised = await raiseContainment(db(), { target: lot!.identity.toLowerCase(), reason: "Capacitor ESR above the maker's limit", severity: "major" }, quality);
    const up = await walkUp(lot!.id);
    const kinds = await db().all<{ id: string; kind: string; identity: string; state: string }>(sql`SELECT id, kind, identity, state FROM items WHERE kind IN ('speaker', 'pair')`);
    const expected = kinds.filter((i) => up.has(i.id) && i.state !== "scrapped").map((i) => i.identity).sort();
    const listedWhole = raised.affected.filter((a) => a.kind === "pair" || a.kind === "speaker").map((a) => a.identity).sort();
    expect(listedWhole).toEqual(expected);
    for (const a of raised.affected.filter((x) => x.kind === "pair")) {
      const [p] = await db().all<{ state: string }>(sql`SELECT state FROM items WHERE id = ${a.itemId}`);
      expect(a.group).toBe(p!.state === "shipped" ? "shipped" : p!.state === "packed" ? "packed" : "in_build");
    }
    const detail = await containmentDetail(db(), raised.code);
    expect(detail.progress.total).toBe(raised.affected.length);
    expect(detail.progress.dispositioned).toBe(0);
  });
});

describe("working a containment through", () => {
  test("holds, moves, notices and closing", async () => {
    const [pair] = await db().all<{ id: string; identity: string }>(sql`SELECT id, identity FROM items WHERE kind = 'pair' AND state = 'shipped' ORDER BY identity LIMIT 1`);
    const raised = await raiseContainment(db(), { target: pair!.identity, reason: "Suspect glue joint", severity: "minor" }, quality);
    expect(raised.affected.map((a) => a.kind).sort()).toEqual(["pair", "speaker", "speaker"]);
    expect(raised.affected.every((a) => a.group === "shipped")).toBe(true);
    // Shipped serials are out of the shop: nothing here holds them.
    expect(await holdsOn(db(), [pair!.id])).toEqual([]);

    const close = await closeContainment(db(), { code: raised.code, reason: "done" }, quality).catch((x: unknown) => x);
    expect((close as AppError).status).toBe(409);

    const mails = await count("outbox");
    const sent = await sendNotices(db(), { code: raised.code }, quality);
    expect(sent.dealers).toBe(1);
    expect(await count("outbox")).toBe(mails + sent.dealers + sent.owners);
    const again = await sendNotices(db(), { code: raised.code }, quality).catch((x: unknown) => x);
    expect((again as AppError).status).toBe(409);
    const rows = await db().select().from(containmentItems).where(eq(containmentItems.containmentId, raised.id));
    expect(rows.every((r) => r.state === "notified")).toBe(true);

    const serials = raised.affected.map((a) => a.identity);
    await moveAffected(db(), { code: raised.code, serials, to: "passed" }, quality);
    const back = await moveAffected(db(), { code: raised.code, serials, to: "notified" }, quality).catch((x: unknown) => x);
    expect((back as AppError).status).toBe(400);
    // Every serial of a group that can take the step, without naming them; none left, it is refused.
    const cleared = await moveAffected(db(), { code: raised.code, wholeGroup: "shipped", to: "cleared" }, quality);
    expect(cleared.moved.map((m) => m.identity).sort()).toEqual([...serials].sort());
    const none = await moveAffected(db(), { code: raised.code, wholeGroup: "shipped", to: "cleared" }, quality).catch((x: unknown) => x);
    expect((none as AppError).status).toBe(409);
    const closed = await closeContainment(db(), { code: raised.code, reason: "All three inspected and sound" }, quality);
    expect(closed.closedAt).not.toBeNull();
    expect(closed.approvedBy).toBe(quality.id);
    // The database refuses to reopen or edit it.
    await expect(db().run(sql`UPDATE containments SET closed_at = NULL WHERE id = ${raised.id}`)).rejects.toThrow();
    await expect(db().run(sql`UPDATE containment_items SET state = 'open' WHERE containment_id = ${raised.id}`)).rejects.toThrow();
    const [c] = await db().select().from(containments).where(eq(containments.id, raised.id));
    expect(c!.closeReason).toBe("All three inspected and sound");
    expect(await count("outbox")).toBeGreaterThan(mails);
  });
});

describe("a failed inspection", () => {
  test("of a shipped speaker opens a service case for it, and counts as dispositioned; without a note it is refused and nothing is written", async () => {
    const [pair] = await db().all<{ id: string; identity: string }>(sql`
      SELECT id, identity FROM items WHERE kind = 'pair' AND state = 'shipped'
        AND id NOT IN (SELECT pair_id FROM service_cases WHERE state NOT IN ('closed', 'cancelled'))
      ORDER BY identity DESC LIMIT 1`);
    const raised = await raiseContainment(db(), { target: pair!.identity, reason: "Suspect crossover solder joints", severity: "major" }, quality);
    const speaker = raised.affected.find((a) => a.kind === "speaker")!;
    const before = [await count("service_cases"), await count("events")];
    const bare = await moveAffected(db(), { code: raised.code, serials: [speaker.identity], to: "failed" }, quality).catch((x: unknown) => x);
    expect((bare as AppError).status).toBe(400);
    expect(Object.keys((bare as AppError).fieldErrors ?? {})).toContain("note");
    expect([await count("service_cases"), await count("events")]).toEqual(before);

    const { moved } = await moveAffected(db(), { code: raised.code, serials: [speaker.identity], to: "failed", note: "Dry joint on the tweeter's series capacitor" }, quality);
    expect(moved[0]!.caseCode).toMatch(/^RT\d{4}-\d{4}$/);
    const [opened] = await db().all<{ pair_id: string; state: string; symptom: string }>(sql`SELECT pair_id, state, symptom FROM service_cases WHERE code = ${moved[0]!.caseCode}`);
    expect(opened).toMatchObject({ pair_id: pair!.id, state: "received" });
    expect(opened!.symptom).toContain(raised.code);
    const detail = await containmentDetail(db(), raised.code);
    expect(detail.progress.dispositioned).toBe(1);
    // The pair's own row joins the same open case rather than opening a second.
    const again = await moveAffected(db(), { code: raised.code, serials: [pair!.identity], to: "failed", note: "Pair held with its speaker" }, quality);
    expect(again.moved[0]!.caseCode).toBe(moved[0]!.caseCode);
  });
});

