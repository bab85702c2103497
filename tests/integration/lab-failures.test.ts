/** The lab's list of failures (lib/lab/queries.ts, failedParts): the newest units, when and why each failed, and how many in all. */
import { beforeAll, describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { changeState, createItem } from "@/lib/genealogy/graph";
import { failedParts } from "@/lib/lab/queries";

const db = () => getDb();
const by = (at: string, reason?: string) => ({ actorId: null, station: "lab" as const, at: new Date(at), ...(reason ? { reason } : {}) });

beforeAll(async () => {
  // Made in this order; they fail in another.
  const made = [
    { identity: "D-TW-26-90001-A", madeAt: "2026-01-01T08:00:00Z", failAt: "2026-01-02T09:00:00Z", reason: "Rub at 4 kHz" },
    { identity: "D-TW-26-90002-B", madeAt: "2026-02-01T08:00:00Z", failAt: "2026-03-05T09:00:00Z", reason: "Open voice coil" },
    { identity: "D-TW-26-90003-C", madeAt: "2026-03-01T08:00:00Z", failAt: "2026-03-02T09:00:00Z", reason: "Buzz at 40 Hz" },
  ];
  for (const m of made) {
    await db().transaction(async (tx) => {
      const item = await createItem(tx, { kind: "drive_unit", identity: m.identity, state: "measured", partType: "tweeter" }, by(m.madeAt));
      await changeState(tx, item, "failed", by(m.failAt, m.reason));
    });
  }
  // A unit that did not fail is not listed.
  await db().transaction((tx) => createItem(tx, { kind: "drive_unit", identity: "D-TW-26-90004-D", state: "measured", partType: "tweeter" }, by("2026-04-01T08:00:00Z")));
});

describe("failedParts", () => {
  test("the newest units that failed, the latest failure first, each with its reason and day, and how many in all", async () => {
    const { parts, total } = await failedParts(db(), 2);
    expect(total).toBe(3);
    expect(parts.map((p) => [p.identity, p.reason, p.at?.toISOString()])).toEqual([
      ["D-TW-26-90002-B", "Open voice coil", "2026-03-05T09:00:00.000Z"],
      ["D-TW-26-90003-C", "Buzz at 40 Hz", "2026-03-02T09:00:00.000Z"],
    ]);
  });
});
