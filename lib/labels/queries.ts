import "server-only";
import type { Station } from "@/lib/vocabulary/stations";
import { and, eq, inArray } from "drizzle-orm";
import type { Db } from "@/db";
import { events } from "@/db/schema";
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
