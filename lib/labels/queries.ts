import "server-only";
import type { Station } from "@/lib/vocabulary/stations";
import { and, eq, gte, inArray } from "drizzle-orm";
import type { Db } from "@/db";
import { events } from "@/db/schema";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";

/** Appends one label.printed event per item, in one transaction; a second print is marked a reprint. */
export async function recordLabelPrints(
  db: Db,
  input: { items: { id: string; identity: string; symbology: string }[]; layout: string; actorId: string; station: Station },
): Promise<number[]> {
  return db.transaction(async (tx) => {
    const ids = input.items.map((i) => i.id);
    const before = await tx
      .select({ subjectId: events.subjectId })
      .from(events)
      .where(and(eq(events.type, "label.printed"), eq(events.subjectKind, "item"), inArray(events.subjectId, ids)));
    const printed = new Set(before.map((r) => r.subjectId));
    const out: number[] = [];
    for (const item of input.items) {
      out.push(
        await appendEvent(tx, {
          actorId: input.actorId,
          station: input.station,
          type: "label.printed",
          subjectKind: "item",
          subjectId: item.id,
          data: { identity: item.identity, layout: input.layout, symbology: item.symbology, reprint: printed.has(item.id) },
        }),
      );
      printed.add(item.id);
    }
    return out;
  });
}

/**
 * How long the person who printed a label may open that print again (a reload, a second tab);
 * after that, and for anyone else, a new print must be asked for, which is recorded.
 */
export const LABEL_PRINT_OPEN_FOR_MS = 10 * 60_000;

/**
 * The recorded print (its "label.printed" event) of this item in this layout that this person
 * made within `LABEL_PRINT_OPEN_FOR_MS`, to show again: true, or false for anyone else's print,
 * an older one, another item's or another layout's. Reading it writes nothing.
 */
export async function labelPrintOpenable(db: Db, input: { eventId: number; itemId: string; layout: string; actorId: string }): Promise<boolean> {
  const [row] = await db
    .select({ data: events.data })
    .from(events)
    .where(
      and(
        eq(events.id, input.eventId),
        eq(events.type, "label.printed"),
        eq(events.subjectKind, "item"),
        eq(events.subjectId, input.itemId),
        eq(events.actorId, input.actorId),
        gte(events.at, new Date(now().getTime() - LABEL_PRINT_OPEN_FOR_MS)),
      ),
    )
    .limit(1);
  return row?.data.layout === input.layout;
}
