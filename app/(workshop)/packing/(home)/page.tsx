import { paths, printPaths } from "@/lib/paths";
import type { Metadata } from "next";
import Link from "next/link";
import { AreaOverview } from "@/components/shell/area-overview";
import { Badge } from "@/components/ui/badge";
import { Panel } from "@/components/ui/panel";
import { TD, TH, TR, Table } from "@/components/ui/table";
import { getDb } from "@/db";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { now } from "@/lib/clock";
import { knownLocations, readyToPack, shippedOn, waitingToShip } from "@/lib/dispatch";
import { isoDay } from "@/lib/dispatch/dates";
import { formatCalendarDay, formatDate } from "@/lib/format";
import { SerialLink } from "@/components/register/serial-link";
import { HeldMark } from "@/components/register/containment-hold";
import { listDealers } from "@/lib/workshop/queries";
import { MoveForm } from "../move-form";
import { ShipForm } from "../ship-form";

export const metadata: Metadata = { title: "Dispatch" };

const packHref = paths.pack;

/** The packers' home: pairs to pack, cartons waiting to ship (and the ship form), what left today. */
export default async function Page() {
  await requirePage("packing.work");
  const db = getDb();
  // One "today" for the list and the form: the workshop's calendar day by the route's clock.
  const today = isoDay(now());
  const [ready, waiting, shipped, dealers, locations] = await Promise.all([readyToPack(db), waitingToShip(db), shippedOn(db, today), listDealers(db), knownLocations(db)]);
  return (
    <AreaOverview area={areaByKey("packing")}>
      <Panel title={`Ready to pack (${ready.length})`}>
        {ready.length ? (
          <Table data-testid="ready-to-pack">
            <caption className="sr-only">Pairs that passed their final test and wait to be packed</caption>
            <thead>
              <tr>
                <TH>Pair</TH>
                <TH>Model</TH>
                <TH>Finish</TH>
                <TH>Tested</TH>
                <TH>
                  <span className="sr-only">Pack</span>
                </TH>
              </tr>
            </thead>
            <tbody>
              {ready.map((p) => (
                <TR key={p.identity} data-testid="ready-pair">
                  <TD>
                    <SerialLink identity={p.identity} />
                  </TD>
                  <TD>
                    {p.modelCode} {p.model}
                  </TD>
                  <TD>{p.finish ?? "—"}</TD>
                  <TD>{p.testedAt ? formatDate(p.testedAt) : "—"}</TD>
                  <TD className="text-right">
                    {p.heldBy ? (
                      <HeldMark code={p.heldBy} />
                    ) : (
                      <Link href={packHref(p.identity)} className="inline-flex min-h-12 items-center rounded-lg border border-leaf-dark bg-leaf px-4 font-bold text-white hover:bg-leaf-dark" aria-label={`Pack ${p.identity}`}>
                        Pack
                      </Link>
                    )}
                  </TD>
                </TR>
              ))}
            </tbody>
          </Table>
        ) : (
          <p className="text-ink-soft">No pair is waiting to be packed. Pairs appear here when they pass their final test.</p>
        )}
      </Panel>

      <Panel title={`Packed, waiting to ship (${waiting.length})`}>
        <ShipForm
          cartons={waiting.map((c) => ({ carton: c.carton, pair: c.pair, model: [c.modelCode, c.model].filter(Boolean).join(" "), finish: c.finish, location: c.location, packedOn: formatCalendarDay(c.packedOn), heldBy: c.heldBy }))}
          dealers={dealers.filter((d) => d.active).map((d) => ({ id: d.id, name: d.name, city: d.city }))}
          today={today}
        />
        {waiting.length ? (
          <div className="mt-6 border-t border-line pt-4">
            <h3 className="mb-2 text-lg font-bold">Moved a carton?</h3>
            <MoveForm cartons={waiting.map((c) => ({ carton: c.carton, location: c.location }))} locations={locations} />
          </div>
        ) : null}
      </Panel>

      <Panel title={`Shipped today (${shipped.length})`}>
        {shipped.length ? (
          <Table data-testid="shipped-today">
            <caption className="sr-only">Cartons that left today</caption>
            <thead>
              <tr>
                <TH>Shipment</TH>
                <TH>Carton</TH>
                <TH>Pair</TH>
                <TH>Dealer</TH>
                <TH>Carrier and tracking</TH>
                <TH>Papers</TH>
              </tr>
            </thead>
            <tbody>
              {shipped.map((s, i) => (
                <TR key={s.carton}>
                  <TD>
                    <SerialLink identity={s.shipment} bold={false} />
                  </TD>
                  <TD>
                    <SerialLink identity={s.carton} bold={false} />
                  </TD>
                  <TD>{s.pair ? <SerialLink identity={s.pair} bold={false} /> : "—"}</TD>
                  <TD>{s.dealer}</TD>
                  <TD>
                    {s.carrier || s.tracking ? (
                      <>
                        {s.carrier ?? "carrier not recorded"} {s.tracking ? <Badge>{s.tracking}</Badge> : null}
                      </>
                    ) : (
                      <span className="text-ink-soft">not recorded</span>
                    )}
                  </TD>
                  <TD>
                    {/* Once per shipment: its first carton's row carries the link. */}
                    {i === 0 || shipped[i - 1]!.shipment !== s.shipment ? (
                      <a href={printPaths.deliveryNote(s.shipment)} target="_blank" rel="noopener" className="font-bold text-leaf underline">
                        Delivery note<span className="sr-only"> of {s.shipment}</span>
                      </a>
                    ) : null}
                  </TD>
                </TR>
              ))}
            </tbody>
          </Table>
        ) : (
          <p className="text-ink-soft">Nothing has shipped today yet.</p>
        )}
      </Panel>
    </AreaOverview>
  );
}
