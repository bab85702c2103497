import { sql } from "drizzle-orm";
import { describe, expect, test } from "vitest";
import { getDb } from "@/db";
import { events } from "@/db/schema";
import { appendEvent, recentEvents } from "@/lib/events/queries";
import { failureText } from "./helpers";

describe("the event log is append-only", () => {
  test("an event is appended with server time, and a correction names the event it corrects", async () => {
    const db = getDb();
    const before = Date.now();
    const first = await appendEvent(db, { actorId: null, station: "admin", type: "flitch.received", subjectKind: "note", subjectId: "n1", data: { text: "first" } });
    const fix = await appendEvent(db, {
      actorId: null, station: "admin", type: "event.corrected", subjectKind: "note", subjectId: "n1",
      data: { text: "second" }, correctsId: first, reason: "typing slip",
    });
    const rows = await recentEvents(db);
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
