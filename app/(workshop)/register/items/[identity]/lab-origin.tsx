import Link from "next/link";
import { and, eq, ne } from "drizzle-orm";
import { SerialLink } from "@/components/register/serial-link";
import { getDb } from "@/db";
import { batchUnits, items, matchedSets, setMembers, unitBatches, type Item } from "@/db/schema";
import { formatDay } from "@/lib/format";

/** A drive unit's batch and the matched set it is reserved in (or was), with its partner. */
export async function LabOrigin({ item, inLab }: { item: Item; inLab: boolean }) {
  const db = getDb();
  const [batch] = await db.select({ code: unitBatches.code, lot: unitBatches.lot, maker: unitBatches.maker, makerSerial: batchUnits.makerSerial }).from(batchUnits).innerJoin(unitBatches, eq(unitBatches.id, batchUnits.batchId)).where(eq(batchUnits.itemId, item.id)).limit(1);
  const sets = await db
    .select({ set: matchedSets, side: setMembers.side, endedAt: setMembers.endedAt, endReason: setMembers.endReason })
    .from(setMembers)
    .innerJoin(matchedSets, eq(matchedSets.id, setMembers.setId))
    .where(eq(setMembers.itemId, item.id));
  const partners = await Promise.all(
    sets.map(async (s) => {
      const [p] = await db.select({ identity: items.identity }).from(setMembers).innerJoin(items, eq(items.id, setMembers.itemId)).where(and(eq(setMembers.setId, s.set.id), ne(setMembers.itemId, item.id))).limit(1);
      return p?.identity ?? null;
    }),
  );
  if (!batch && !sets.length) return null;
  return (
    <div className="flex flex-col gap-1" data-testid="lab-origin">
      {batch ? (
        <p>
          From batch{" "}
          {inLab ? (
            <Link className="serial font-bold text-leaf-dark underline" href={`/lab/batches/${encodeURIComponent(batch.code)}`}>
              {batch.code}
            </Link>
          ) : (
            <span className="serial font-bold">{batch.code}</span>
          )}{" "}
          ({batch.maker}, lot {batch.lot}){batch.makerSerial ? `; maker's serial ${batch.makerSerial}` : ""}
        </p>
      ) : null}
      {sets.map((s, i) => (
        <p key={s.set.id}>
          {s.endedAt ? "Was" : "Reserved"} in matched set <span className="serial font-bold">{s.set.code}</span> as the {s.side === "L" ? "left" : "right"} unit
          {partners[i] ? (
            <>
              , with <SerialLink identity={partners[i]!} bold={false} />
            </>
          ) : null}{" "}
          ({s.set.maxDiffDb.toFixed(2)} dB at most against a {s.set.limitDb} dB limit, {formatDay(s.set.createdAt)}){s.endedAt ? `: ${s.endReason}` : ""}.
        </p>
      ))}
    </div>
  );
}
