import { paths } from "@/lib/paths";
import type { Metadata } from "next";
import Link from "next/link";
import { AreaOverview } from "@/components/shell/area-overview";
import { ModelTable } from "@/components/workshop/reference-tables";
import { SerialLink } from "@/components/register/serial-link";
import { buttonClasses } from "@/components/ui/button";
import { Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { listModels } from "@/lib/workshop/queries";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { now } from "@/lib/clock";
import { formatAllowedFrom, formatTimeOfDay, formatWhen, timesNote } from "@/lib/format";
import { shopBoard, shopPairs, type ShopPair } from "@/lib/route/shop";
import { ncsToDisposition } from "@/lib/route/nonconformances";
import { ncWhere } from "@/lib/route/words";
import { workshopDayEnd } from "@/lib/workshop-time";
import { STATION_NAME } from "@/lib/vocabulary/stations";
import { AutoRefresh } from "../auto-refresh";
import { ScanForm } from "../scan-form";

export const metadata: Metadata = { title: "Cabinet shop" };

const route = (p: string) => paths.cabinetPair(p);
const side = (s: ShopPair["sides"]) => (s.length === 2 ? "both" : s[0] === "L" ? "left only" : "right only");

export default async function Page() {
  await requirePage("cabinet.work");
  const db = getDb();
  const at = now();
  const [models, pairs, ncs] = await Promise.all([listModels(db), shopPairs(db, at), ncsToDisposition(db)]);
  // "Today" is the workshop's day, in its own time zone.
  const { releasingToday, overdue, stations } = shopBoard(pairs, at, workshopDayEnd(at));
  return (
    <AreaOverview area={areaByKey("cabinet")}>
      <div className="flex flex-wrap items-end justify-between gap-4">
        <ScanForm />
        <div className="flex flex-col items-end gap-2">
          <div className="flex flex-wrap gap-2">
            <Link href={paths.lacquer} className={buttonClasses("secondary")}>
              Lacquer cabinets
            </Link>
            <Link href={paths.trimParts} className={buttonClasses("secondary")}>
              Trim parts
            </Link>
          </div>
          <AutoRefresh readAt={formatTimeOfDay(at)} />
        </div>
      </div>
      <div className="grid gap-6 lg:grid-cols-3">
        <Panel title="Holds that release today">
          {releasingToday.length ? (
            <ul className="flex flex-col gap-1" data-testid="holds-today">
              {releasingToday.map((p) => (
                <li key={p.pair}>
                  <SerialLink identity={p.pair} href={route(p.pair)} /> at {formatTimeOfDay(p.holdUntil!)}: {p.holdLabel}, then {p.next?.name.toLowerCase()}
                </li>
              ))}
            </ul>
          ) : (
            <p className="text-ink-soft">No hold ends later today.</p>
          )}
        </Panel>
        <Panel title="Overdue">
          {overdue.length ? (
            <ul className="flex flex-col gap-1" data-testid="overdue">
              {overdue.map((p) => (
                <li key={p.pair}>
                  <SerialLink identity={p.pair} href={route(p.pair)} />: {p.next?.name} waiting since {formatWhen(p.readySince!, at)}
                </li>
              ))}
            </ul>
          ) : (
            <p className="text-ink-soft">Nothing has waited more than two days.</p>
          )}
        </Panel>
        <Panel title="Open nonconformances">
          {ncs.length ? (
            <ul className="flex flex-col gap-1" data-testid="shop-ncs">
              {ncs.map(({ nc, pair, steps }) => (
                <li key={nc.id}>
                  <span className="font-bold">{nc.code}</span> <SerialLink identity={pair} href={route(pair)} bold={false} /> {ncWhere(nc.seq, steps.find((s) => s.seq === nc.seq)?.name)}: {nc.finding}
                </li>
              ))}
            </ul>
          ) : (
            <p className="text-ink-soft">None open.</p>
          )}
        </Panel>
      </div>
      <p className="-mt-3 text-sm text-ink-soft" data-testid="times-note">
        {timesNote()}
      </p>
      <Panel title="Work at each station">
        {stations.length ? (
          <div className="grid gap-4 md:grid-cols-2 xl:grid-cols-3" data-testid="station-work">
            {stations.map(({ station: s, ready: go, waiting }) => {
              return (
                <section key={s} className="rounded-lg border border-line bg-paper p-3" data-testid={`station-${s}`}>
                  <h3 className="mb-2 font-bold">
                    {STATION_NAME[s]} <span className="text-sm font-normal text-ink-soft">({go.length} ready)</span>
                  </h3>
                  <ul className="flex flex-col gap-1">
                    {go.map((p) => (
                      <li key={p.pair}>
                        <SerialLink identity={p.pair} href={route(p.pair)} /> {p.model}: {p.next?.name}
                        {p.trim ? " (trim part)" : p.lone ? " (lacquer cabinet, not yet paired)" : p.sides.length < 2 ? ` (${side(p.sides)})` : ""}
                        {p.unpartnered ? " · unpartnered" : ""}
                      </li>
                    ))}
                    {waiting.map((p) => (
                      <li key={p.pair} className="text-ink-soft">
                        <SerialLink identity={p.pair} href={route(p.pair)} bold={false} /> {p.next?.name}: {p.openNcs.length ? `on hold (${p.openNcs.join(", ")})` : `on hold until ${formatAllowedFrom(p.holdUntil!, at, { zone: false })}`}
                      </li>
                    ))}
                  </ul>
                </section>
              );
            })}
          </div>
        ) : (
          <p className="text-ink-soft">No pair is on the cabinet route.</p>
        )}
      </Panel>
      <Panel title="Models built here">
        <ModelTable models={models} show="veneer" />
      </Panel>
    </AreaOverview>
  );
}
