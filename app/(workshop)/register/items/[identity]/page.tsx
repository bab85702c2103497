import { paths } from "@/lib/paths";
import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { EventTable } from "@/components/shell/event-table";
import { MomentSwitch } from "@/components/register/moment-switch";
import { PairHalves } from "@/components/register/pair-halves";
import { SerialLink } from "@/components/register/serial-link";
import { PrintLabels } from "@/components/register/print-labels";
import { TraceTreePicture } from "@/components/register/trace-tree-lazy";
import { Badge } from "@/components/ui/badge";
import { BackLink } from "@/components/ui/back-link";
import { DataTable } from "@/components/ui/data-table";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { recentEvents } from "@/lib/events/queries";
import { formatCalendarDay, formatDay, formatWhen, timesNote } from "@/lib/format";
import { noonUtc } from "@/lib/dispatch/dates";
import { shipmentFacts } from "@/lib/dispatch/queries";
import { positionWords } from "@/lib/events/describe";
import { momentParam, resolveMoment } from "@/lib/genealogy/moment";
import { KIND_WORD, kindLabel, stateLabel } from "@/lib/vocabulary/item-kinds";
import { dealersOf, itemDetails } from "@/lib/genealogy/queries";
import { holderView, toTree, traceBackward, type HolderView } from "@/lib/genealogy/trace";
import { PairVeneer } from "./pair-veneer";
import { LabOrigin } from "./lab-origin";
import { parseLeafIdentity } from "@/lib/serials";
import { casesTouching } from "@/lib/service/queries";
import { containmentsTouching, holdsOn } from "@/lib/containments";
import { AFFECTED_STATE_WORDS } from "@/lib/vocabulary/containments";
import { CASE_STATE_WORDS, OPEN_CASE_STATES } from "@/lib/vocabulary/case-states";
import { OwnerRegistrations } from "@/components/register/owner-registrations";
import { now } from "@/lib/clock";
import { registrationsOfPair } from "@/lib/owners/registrations";

/** A leaf names its flitch and number; a flitch opens in the veneer room for those who work there. */
function VeneerOrigin({ identity, kind, inVeneerRoom }: { identity: string; kind: "flitch" | "leaf"; inVeneerRoom: boolean }) {
  const flitch = kind === "leaf" ? parseLeafIdentity(identity)?.flitch.canonical : identity;
  if (!flitch) return null;
  const leafNo = kind === "leaf" ? parseLeafIdentity(identity)?.leafNo : null;
  return (
    <p data-testid="veneer-origin">
      {leafNo ? <>Leaf {leafNo} of flitch </> : null}
      <SerialLink identity={flitch} href={inVeneerRoom ? paths.flitch(flitch) : undefined} />
      {inVeneerRoom ? " (opens in the veneer room, with its leaf table, plan and photos)" : ""}
    </p>
  );
}

export async function generateMetadata({ params }: { params: Promise<{ identity: string }> }): Promise<Metadata> {
  return { title: pageParam((await params).identity) };
}


// Lots are held by thousands: the cards show a few and say how many more.
const SHOW = 5;
// …and the table of holders lists this many, with the whole list one link away as JSON: fifteen
// thousand rows would make the page megabytes long and slow to build, send and draw.
const HOLDER_ROWS = 200;

function HolderSummary({ byKind }: { byKind: HolderView["byKind"] }) {
  if (byKind.length === 0) return null;
  const max = Math.max(...byKind.map((k) => k.n));
  return (
    <div className="mb-4 flex flex-col gap-1" data-testid="holder-summary">
      {byKind.map(({ kind, n }) => (
        <div key={kind} className="flex items-center gap-3">
          <span className="w-32 text-sm font-bold">{kindLabel(kind)}</span>
          <span className="h-4 rounded bg-leaf" style={{ width: `${Math.max(2, (n / max) * 60)}%` }} aria-hidden="true" />
          <span className="text-sm tabular-nums">{n.toLocaleString("en")}</span>
        </div>
      ))}
    </div>
  );
}

export default async function ItemPage({ params, searchParams }: { params: Promise<{ identity: string }>; searchParams: Promise<{ at?: string }> }) {
  const user = await requirePage("register.read");
  const db = getDb();
  const identity = pageParam((await params).identity);
  const found = await itemDetails(db, identity, { parents: SHOW });
  if (!found) notFound();
  const { item, model, finish, dealer, parents, parentCount, shippedAt } = found;

  const atParam = momentParam.safeParse((await searchParams).at ?? "now");
  const at = atParam.success ? atParam.data : "now";
  const { moment, label, note } = resolveMoment(at, shippedAt);
  const [inside, holders, everInside] = await Promise.all([
    traceBackward(db, item.id, moment),
    holderView(db, item.id, moment.mode === "ever" ? { mode: "now" } : moment, HOLDER_ROWS),
    // The history lists events of every part ever fitted directly, whatever the moment shown.
    moment.mode === "ever" ? null : traceBackward(db, item.id, { mode: "ever" }),
  ]);
  const tree = toTree(inside);
  const events = await recentEvents(db, { viewer: user, subjects: { kind: "item", ids: [item.id, ...(everInside ?? inside).filter((n) => n.depth === 1).map((n) => n.id)] }, limit: 200 });
  const { shipments } = holders;
  const [reachedDealers, facts] = await Promise.all([
    dealersOf(db, shipments.map((s) => s.id)),
    // One shipment (or the item is one): its dealer and day, to say where the item went in words.
    shipmentFacts(db, item.kind === "shipment" ? [item.id] : shipments.length === 1 ? [shipments[0]!.id] : []),
  ]);
  const cases = item.kind === "speaker" || item.kind === "pair" ? await casesTouching(db, item.id) : [];
  const registrations = item.kind === "pair" ? await registrationsOfPair(db, item.id) : [];
  const [holds, touches] = await Promise.all([holdsOn(db, [item.id]), containmentsTouching(db, item.id)]);
  const ownShipment = item.kind === "shipment" ? (facts[0] ?? null) : null;
  const shipment = item.kind === "shipment" ? null : (facts[0] ?? null);

  return (
    <div className="flex flex-col gap-6" data-testid="item-page">
      <BackLink href="/register">Register</BackLink>
      <PageHeader
        title={<span className="serial" data-testid="item-identity">{item.identity}</span>}
        lead={[kindLabel(item.kind), model?.name, finish?.name, item.partType].filter(Boolean).join(" · ")}
        actions={<Badge tone={item.state === "failed" || item.state === "scrapped" ? "danger" : item.state === "shipped" ? "leaf" : "info"}>{stateLabel(item.state)}</Badge>}
      />

      {item.kind === "pair" ? (
        <p>
          <Link className="font-bold text-leaf-dark underline" href={paths.cabinetPair(item.identity)} data-testid="route-link">
            Its cabinet route: the steps recorded, holds and nonconformances
          </Link>
        </p>
      ) : null}
      {cases.length ? (
        <Notice tone={cases.some((c) => (OPEN_CASE_STATES as readonly string[]).includes(c.state)) ? "caution" : "info"} testId="item-service-cases">
          <span className="font-bold">Service: </span>
          {cases.map((c, i) => (
            <span key={c.code}>
              {i ? "; " : ""}
              {user.permissions.has("service.work") ? (
                <Link className="serial underline" href={paths.serviceCase(c.code)}>
                  {c.code}
                </Link>
              ) : (
                <span className="serial">{c.code}</span>
              )}
              {` (${CASE_STATE_WORDS[c.state].toLowerCase()}), ${c.itemId === item.id ? "came back" : item.kind === "pair" ? "one speaker came back" : c.partnerId === item.id ? "its partner came back" : "the whole pair came back"} on ${formatCalendarDay(c.receivedOn, new Date(0))}`}
            </span>
          ))}
        </Notice>
      ) : null}
      {holds.length || touches.length ? (
        <Notice tone={holds.length ? "danger" : "info"} testId="item-containments">
          {holds.length ? (
            <p className="font-bold">
              Held by containment{" "}
              {[...new Set(holds.map((h) => h.code))].map((code, i) => (
                <span key={code}>
                  {i ? ", " : ""}
                  <Link className="serial underline" href={paths.containment(code)}>
                    {code}
                  </Link>
                </span>
              ))}
              : {holds[0]!.reason} No station, assembly, packing or shipping takes it until quality releases it.
            </p>
          ) : null}
          {[...new Set(touches.map((t) => t.code))].map((code) => {
            const rows = touches.filter((t) => t.code === code);
            return (
              <p key={code}>
                <span className="font-bold">Containment </span>
                <Link className="serial underline" href={paths.containment(code)}>
                  {code}
                </Link>
                {` (${rows[0]!.closed ? "closed" : "open"}): `}
                {rows.map((t, i) => (
                  <span key={t.serial}>
                    {i ? "; " : ""}
                    {t.serial === item.identity ? `this ${kindLabel(item.kind).toLowerCase()}` : <span className="serial whitespace-nowrap">{t.serial}</span>}
                    {` ${AFFECTED_STATE_WORDS[t.state].toLowerCase()}`}
                  </span>
                ))}
              </p>
            );
          })}
        </Notice>
      ) : null}
      {item.kind === "drive_unit" || item.kind === "crossover" ? <LabOrigin item={item} inLab={user.permissions.has("lab.work")} /> : null}
      {item.kind === "trim_part" ? (
        <Notice tone="info" testId="trim-route-link">
          A metal trim part{typeof item.attrs.supplier === "string" ? ` from ${item.attrs.supplier}` : ""}: its steps are on{" "}
          <Link href={paths.cabinetPair(item.identity)} className="underline">
            its trim-part route
          </Link>
          .
        </Notice>
      ) : null}
      {item.kind === "flitch" || item.kind === "leaf" ? <VeneerOrigin identity={item.identity} kind={item.kind} inVeneerRoom={user.permissions.has("veneer.work")} /> : null}

      {/* The cards wrap to fewer columns rather than squeeze: a serial is never cut or broken. */}
      <div className="grid grid-cols-[repeat(auto-fit,minmax(min(100%,20rem),1fr))] gap-4">
        <Panel title="Where it is now">
          {parents.length === 0 ? (
            <p className="text-ink-soft" data-testid="current-place">
              {item.kind === "shipment" && dealer ? `Shipped to ${dealer.name}, ${dealer.city}${ownShipment ? `, on ${formatCalendarDay(ownShipment.shippedOn)}` : ""}.` : "Not inside anything."}
            </p>
          ) : (
            <ul className="flex flex-col gap-1" data-testid="current-parents">
              {parents.map((p, i) => {
                const words = positionWords(p.kind, p.position);
                // The first holder carries the journey on: "…, shipped to <dealer> on <day> in shipment H-…".
                const via = i === 0 && shipment && shipment.id !== p.id ? shipment : null;
                const own = i === 0 && shipment && shipment.id === p.id ? shipment : null;
                return (
                  <li key={`${p.id}-${p.position}`} data-testid="current-place">
                    In {KIND_WORD[p.kind] ?? "item"} <SerialLink identity={p.identity} />
                    {words ? `, as its ${words}` : ""}
                    {via ? (
                      <>
                        , shipped{via.dealer ? ` to ${via.dealer.name}` : ""} on {formatCalendarDay(via.shippedOn)} in shipment <SerialLink identity={via.identity} bold={false} />
                      </>
                    ) : own ? (
                      `, shipped${own.dealer ? ` to ${own.dealer.name}` : ""} on ${formatCalendarDay(own.shippedOn)}`
                    ) : (
                      <span className="text-sm text-ink-soft"> since {formatDay(p.since)}</span>
                    )}
                  </li>
                );
              })}
              {parentCount > parents.length ? <li className="text-ink-soft">and {(parentCount - parents.length).toLocaleString("en")} more: see what holds it, below.</li> : null}
            </ul>
          )}
        </Panel>
        <Panel title="Shipped">
          {ownShipment ? (
            <p data-testid="shipped-when">
              {formatDay(noonUtc(ownShipment.shippedOn))}
              {ownShipment.dealer ? ` to ${ownShipment.dealer.name}` : ""}
            </p>
          ) : shippedAt ? (
            <p data-testid="shipped-when">
              {shipment ? formatDay(noonUtc(shipment.shippedOn)) : formatDay(shippedAt)}
              {shipment?.dealer ? ` to ${shipment.dealer.name}` : ""}
              {shipments.length ? (
                <>
                  {" "}
                  in {shipments.length === 1 ? "shipment " : "shipments "}
                  {shipments.slice(0, SHOW).map((s, i) => (
                    <span key={s.id}>
                      {i ? ", " : ""}
                      <SerialLink identity={s.identity} bold={false} />
                    </span>
                  ))}
                  {shipments.length > SHOW ? ` and ${shipments.length - SHOW} more` : ""}
                </>
              ) : null}
            </p>
          ) : (
            <p className="text-ink-soft">Not shipped.</p>
          )}
        </Panel>
        <Panel title="Created">
          <p>{formatDay(item.createdAt)}</p>
        </Panel>
      </div>

      <Panel title="Inside it" actions={<MomentSwitch current={at} hasShipped={Boolean(shippedAt)} />}>
        <p className="mb-3 text-ink-soft" data-testid="moment-label">Shown {label}.</p>
        {note ? <Notice tone="info" className="mb-3">{note}</Notice> : null}
        {atParam.success ? null : <Notice tone="danger" className="mb-3">{atParam.error.issues[0]?.message}</Notice>}
        {item.kind === "pair" && tree ? <PairHalves tree={tree} /> : null}
        {tree && tree.children.length ? (
          <TraceTreePicture tree={tree} />
        ) : (
          <p className="text-ink-soft">Nothing sits inside it {label === "now" ? "now" : label}.</p>
        )}
        <p className="mt-3 text-sm">
          <a className="font-bold text-leaf-dark underline" href={`/api/v1/items/${encodeURIComponent(item.identity)}/trace?direction=backward&asOf=${encodeURIComponent(at)}`}>Trace as JSON</a>
          {" · "}
          <a className="font-bold text-leaf-dark underline" href={`/api/v1/items/${encodeURIComponent(item.identity)}/epcis`}>Events as EPCIS 2.0 JSON</a>
        </p>
      </Panel>

      {item.kind === "pair" && finish?.kind === "veneer" && model ? (
        <Panel title="Veneer">
          <PairVeneer pair={item} leavesPerFace={model.leavesPerFace} canRepair={user.permissions.has("veneer.work")} />
        </Panel>
      ) : null}

      {item.kind === "pair" && (item.state === "shipped" || registrations.length) ? (
        <Panel title="Owners' registrations">
          <OwnerRegistrations rows={registrations} show="owner" now={now()} />
        </Panel>
      ) : null}

      <Panel title="What holds it">
        <HolderSummary byKind={holders.byKind} />
        {reachedDealers.length ? (
          <p className="mb-4" data-testid="reached-dealers">
            Shipped to{" "}
            {reachedDealers.map((d, i) => (
              <span key={d.id}>
                {i ? ", " : ""}
                <Link className="font-bold text-leaf-dark underline" href={`/register/dealers/${d.code}`}>{d.name}</Link> ({d.city}, {Number(d.shipments)} shipment{Number(d.shipments) === 1 ? "" : "s"})
              </span>
            ))}
            .
          </p>
        ) : null}
        <details open={holders.count <= 40} className="group">
          <summary className="mb-3 cursor-pointer font-bold text-leaf-dark">Every holder ({holders.count.toLocaleString("en")})</summary>
        <DataTable
          caption="Everything that holds this item"
          testId="holders-table"
          empty="Nothing holds it."
          columns={[
            { key: "identity", label: "Serial" },
            { key: "kind", label: "Kind" },
          ]}
          rows={holders.first.map((h) => ({
              id: h.id,
              cells: {
                identity: { value: h.identity, display: <SerialLink identity={h.identity} /> },
                kind: { value: kindLabel(h.kind) },
              },
            }))}
        />
        {holders.count > HOLDER_ROWS ? (
          <p className="mt-2 text-sm" data-testid="holders-more">
            The first {HOLDER_ROWS} of {holders.count.toLocaleString("en")}, the nearest holders first.{" "}
            <a className="font-bold text-leaf-dark underline" href={`/api/v1/items/${encodeURIComponent(item.identity)}/trace?direction=forward`}>Every holder as JSON</a>
          </p>
        ) : null}
        </details>
      </Panel>

      {user.permissions.has("labels.print") ? (
        <Panel title="Label">
          <div className="mb-4 flex items-center gap-4">
            {/* eslint-disable-next-line @next/next/no-img-element -- a generated barcode, not a photo */}
            <img src={`/api/v1/items/${encodeURIComponent(item.identity)}/barcode?format=svg`} alt={`Barcode of ${item.identity}`} className="h-20 w-auto bg-white p-2" />
          </div>
          <PrintLabels identities={[item.identity]} />
        </Panel>
      ) : null}

      <Panel title="History">
        <p className="mb-3 text-sm text-ink-soft">Events about this item and the parts fitted directly into it, newest first. {events.length >= 200 ? "Showing the latest 200." : ""}</p>
        <EventTable events={events} caption={`Events of ${item.identity}`} />
        <p className="mt-2 text-sm text-ink-soft">{timesNote()} Latest: {events[0] ? formatWhen(events[0].at) : "none"}.</p>
      </Panel>
    </div>
  );
}
