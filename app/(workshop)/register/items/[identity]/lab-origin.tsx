import Link from "next/link";
import { SerialLink } from "@/components/register/serial-link";
import { getDb } from "@/db";
import type { Item } from "@/lib/genealogy/graph";
import { labOrigin } from "@/lib/lab/queries";
import { formatDay } from "@/lib/format";

/** A drive unit's batch and the matched set it is reserved in (or was), with its partner. */
export async function LabOrigin({ item, inLab }: { item: Item; inLab: boolean }) {
  const { batch, sets } = await labOrigin(getDb(), item.id);
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
      {sets.map((s) => (
        <p key={s.id}>
          {s.endedAt ? "Was" : "Reserved"} in matched set <span className="serial font-bold">{s.code}</span> as the {s.side === "L" ? "left" : "right"} unit
          {s.partner ? (
            <>
              , with <SerialLink identity={s.partner} bold={false} />
            </>
          ) : null}{" "}
          ({s.maxDiffDb.toFixed(2)} dB at most against a {s.limitDb} dB limit, {formatDay(s.createdAt)}){s.endedAt ? `: ${s.endReason}` : ""}.
        </p>
      ))}
    </div>
  );
}
