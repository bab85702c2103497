import { SerialLink } from "@/components/register/serial-link";
import { leafList } from "@/lib/veneer/plan";
import { getDb } from "@/db";
import type { Item } from "@/lib/genealogy/graph";
import { pairVeneer } from "@/lib/veneer/flitches";
import { ReserveForms } from "./reserve-forms";

/** A veneered pair's leaves: each face position with its leaf, the reserve, and (for the veneer room) repairs. */
export async function PairVeneer({ pair, leavesPerFace, canRepair }: { pair: Item; leavesPerFace: number; canRepair: boolean }) {
  const rows = await pairVeneer(getDb(), pair.id);
  if (!rows.length) return null;
  const faces = rows.filter((r) => r.a.role === "face");
  const cabinets = [...new Map(faces.map((f) => [f.a.cabinetId!, { id: f.a.cabinetId!, identity: f.cabinet!, side: f.a.orientation === "turned" ? "R" : "L" }])).values()].sort((a, b) => a.side.localeCompare(b.side));
  const reserves = rows.filter((r) => r.a.role === "reserve" && r.a.endedAt === null);
  const ended = rows.filter((r) => r.a.role === "reserve" && r.a.endedAt !== null);
  return (
    <div className="flex flex-col gap-4" data-testid="pair-veneer">
      <div className="grid gap-4 md:grid-cols-2">
        {cabinets.map((c) => (
          <div key={c.id} className="rounded-lg border border-line bg-paper p-3">
            <p className="font-bold">{c.side === "L" ? "Left face" : "Right face (leaves turned over)"}</p>
            <SerialLink identity={c.identity} bold={false} />
            <ul className="mt-2 text-sm">
              {faces
                .filter((f) => f.a.cabinetId === c.id)
                .sort((a, b) => a.a.position!.localeCompare(b.a.position!) || a.a.startedAt.getTime() - b.a.startedAt.getTime())
                .map((f) => (
                  <li key={f.a.id} className={f.leafState === "scrapped" ? "text-ink-soft" : undefined}>
                    <span className="inline-block w-8 font-bold">{f.a.position}</span>{" "}
                    {f.leafState === "scrapped" ? (
                      <>
                        <s>
                          <SerialLink identity={f.leaf} bold={false} />
                        </s>{" "}
                        (leaf {f.seq}, taken off: face re-veneered)
                      </>
                    ) : (
                      <>
                        <SerialLink identity={f.leaf} bold={false} /> (leaf {f.seq})
                      </>
                    )}
                  </li>
                ))}
            </ul>
          </div>
        ))}
      </div>
      <p data-testid="pair-reserves">
        {reserves.length ? `Held in reserve: ${leafList(reserves.map((r) => r.seq))}.` : "No reserve leaf held."}
        {ended.length ? ` Earlier reserves: ${ended.map((r) => `leaf ${r.seq} ${r.a.endReason}`).join(", ")}.` : ""}
      </p>
      {canRepair && reserves.length ? (
        <ReserveForms
          pair={pair.identity}
          reserves={reserves.map((r) => ({ id: r.a.leafId, label: `Leaf ${r.seq} (${r.leaf})` }))}
          cabinets={cabinets.map((c) => ({ id: c.id, label: `${c.side === "L" ? "Left" : "Right"}: ${c.identity}` }))}
          positions={Array.from({ length: leavesPerFace }, (_, i) => `F${i + 1}`)}
        />
      ) : null}
    </div>
  );
}
