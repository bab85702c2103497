import { sql } from "drizzle-orm";
import { describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { dealers, events, users } from "@/db/schema";
import { createItem } from "@/lib/genealogy/graph";
import { appendEvent, recentEvents } from "@/lib/events/queries";
import { permissionsOf } from "@/lib/auth/permissions";
import { failureText } from "./helpers";

/** An administrator reads the whole log (see tests/integration/event-scope.test.ts for everyone else). */
const viewer = { id: "admin-reader", permissions: permissionsOf(["admin"]) };

describe("the event log is append-only", () => {
  test("an event is appended with server time, and a correction names the event it corrects", async () => {
    const db = getDb();
    const before = Date.now();
    const first = await appendEvent(db, { actorId: null, station: "admin", type: "flitch.received", subjectKind: "note", subjectId: "n1", data: { text: "first" } });
    const fix = await appendEvent(db, {
      actorId: null, station: "admin", type: "event.corrected", subjectKind: "note", subjectId: "n1",
      data: { text: "second" }, correctsId: first, reason: "typing slip",
    });
    const rows = await recentEvents(db, { viewer });
    expect(rows.map((r) => r.id)).toEqual([fix, first]);
    expect(rows[1]!.at.getTime()).toBeGreaterThanOrEqual(before - 1000);
    expect(rows[0]!.correctsId).toBe(first);
  });

  test("a correction without a reason is refused by the schema", async () => {
    const db = getDb();
    const first = await appendEvent(db, { actorId: null, station: "admin", type: "flitch.received", subjectKind: "note", subjectId: "n2" });
    await expect(
      appendEvent(db, { actorId: null, station: "admin", type: "event.corrected", subjectKind: "note", subjectId: "n2", correctsId: first }),
    ).rejects.toThrow();
  });

  test("UPDATE on the event log fails", async () => {
    const db = getDb();
    const id = await appendEvent(db, { actorId: null, station: "admin", type: "flitch.received", subjectKind: "note", subjectId: "n3" });
    expect(await failureText(() => db.update(events).set({ type: "flitch.changed" }).where(sql`${events.id} = ${id}`))).toMatch(/append-only/);
    const [row] = await db.select().from(events).where(sql`${events.id} = ${id}`);
    expect(row?.type).toBe("flitch.received");
  });

  test("DELETE on the event log fails", async () => {
    const db = getDb();
    const id = await appendEvent(db, { actorId: null, station: "admin", type: "flitch.received", subjectKind: "note", subjectId: "n4" });
    expect(await failureText(() => db.delete(events).where(sql`${events.id} = ${id}`))).toMatch(/append-only/);
    expect(await failureText(() => db.run(sql`DELETE FROM events`))).toMatch(/append-only/);
    const [row] = await db.select().from(events).where(sql`${events.id} = ${id}`);
    expect(row?.id).toBe(id);
  });
});

describe("recentEvents names each subject", () => {
  test("an item by its serial and kind, a user and a dealer by name, a shipment's dealer code by the dealer's name", async () => {
    const db = getDb();
    await db.insert(users).values({ id: "u-named", email: "named@example.test", name: "Nell Hart", passwordHash: "x" });
    await db.insert(dealers).values({ id: "d-named", code: "NHA", name: "North Hall Audio", email: "nha@example.test", city: "Dunmore", country: "GB" });
    const carton = await db.transaction((tx) => createItem(tx, { kind: "carton", identity: "K-PW2-26-00041-P", state: "packed" }, { actorId: "u-named", station: "packing" }));
    await appendEvent(db, { actorId: "u-named", station: "packing", type: "pair.shipped", subjectKind: "item", subjectId: carton.id, data: { dealer: "NHA" } });
    await appendEvent(db, { actorId: null, station: "admin", type: "user.deactivated", subjectKind: "user", subjectId: "u-named" });
    await appendEvent(db, { actorId: null, station: "admin", type: "dealer.created", subjectKind: "dealer", subjectId: "d-named" });
    const rows = await recentEvents(db, { viewer, limit: 4 });
    expect(rows.map((r) => [r.type, r.subjectName, r.subjectItemKind])).toEqual([
      ["dealer.created", "North Hall Audio", null],
      ["user.deactivated", "Nell Hart", null],
      ["pair.shipped", "K-PW2-26-00041-P", "carton"],
      ["item.created", "K-PW2-26-00041-P", "carton"],
    ]);
    expect(rows[2]!.dealerNames).toEqual({ NHA: "North Hall Audio" });
    expect(rows[2]!.actorName).toBe("Nell Hart");
  });
});
