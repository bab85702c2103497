import type { Metadata } from "next";
import Link from "next/link";
import { BackLink } from "@/components/ui/back-link";
import { Badge } from "@/components/ui/badge";
import { buttonClasses } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { TD, TH, TR, Table } from "@/components/ui/table";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { formatDate, formatWhenExact } from "@/lib/format";
import { windowText } from "@/lib/route/rules";
import { routesOverview, type RouteVersion } from "@/lib/route/specs";
import { isRouteKind, ROUTE_KIND_LABEL, type RouteKind } from "@/lib/vocabulary/route-kinds";
import type { StepSpec } from "@/lib/route/types";
import { STATION_NAME } from "@/lib/vocabulary/stations";
import { holdText } from "@/lib/route/spec-rules";

export const metadata: Metadata = { title: "Routes" };

const pairsText = (n: number) => (n === 0 ? "no pairs" : n === 1 ? "1 pair" : `${n} pairs`);

/** A version's steps, in route order: what is read, its window, and the wait after it. */
function StepsTable({ steps, caption, testId }: { steps: StepSpec[]; caption: string; testId?: string }) {
  return (
    <Table data-testid={testId}>
      <caption className="sr-only">{caption}</caption>
      <thead>
        <tr>
          <TH className="w-12 text-right">Step</TH>
          <TH>Name</TH>
          <TH>Station</TH>
          <TH>Readings and their windows</TH>
          <TH>After it</TH>
        </tr>
      </thead>
      <tbody>
        {steps.map((s) => (
          <TR key={s.seq} data-testid={testId ? `${testId}-step-${s.seq}` : undefined}>
            <TD className="text-right tabular-nums">{s.seq}</TD>
            <TD>
              <span className="font-bold">{s.name}</span> <code className="font-mono text-sm text-ink-soft">{s.key}</code>
              {s.note ? <p className="mt-1 max-w-prose text-sm text-ink-soft">{s.note}</p> : null}
            </TD>
            <TD>{STATION_NAME[s.station] ?? s.station}</TD>
            <TD>
              {s.readings.length ? (
                <ul className="flex flex-col gap-0.5">
                  {s.readings.map((r) => (
                    <li key={r.key}>
                      {r.label}: <span className="whitespace-nowrap font-bold">{windowText(r)}</span>
                    </li>
                  ))}
                </ul>
              ) : (
                <span className="text-ink-soft">no readings</span>
              )}
            </TD>
            <TD>{s.holdAfter ? holdText(s.holdAfter) : <span className="text-ink-soft">next step at once</span>}</TD>
          </TR>
        ))}
      </tbody>
    </Table>
  );
}

/** One kind of a model's route: its current version with its steps, and the earlier versions folded. */
function RouteVersions({ code, name, kind, versions }: { code: string; name: string; kind: RouteKind; versions: RouteVersion[] }) {
  const [current, ...earlier] = versions;
  const id = kind === "cabinet" ? code : `${code}-trim`;
  const editHref = `/admin/routes/${encodeURIComponent(code)}/edit${kind === "cabinet" ? "" : `?kind=${kind}`}`;
  const what = kind === "cabinet" ? "pairs" : "trim parts";
  const onIt = (n: number) => (kind === "cabinet" ? pairsText(n) : n === 1 ? "1 trim part" : `${n} trim parts`);
  return (
    <Panel
      title={
        <>
          {name} <span className="serial text-ink-soft">{code}</span> · {ROUTE_KIND_LABEL[kind].toLowerCase()}
        </>
      }
      actions={
        <Link href={editHref} className={buttonClasses(current ? "secondary" : "primary", "sm")} data-testid={`edit-route-${id}`}>
          {current ? "Edit as a new version" : "Set its route"}
        </Link>
      }
    >
      <div data-testid={`route-${id}`} className="flex flex-col gap-4">
        {current ? (
          <>
            <p data-testid={`route-${id}-current`}>
              <Badge tone="leaf">version {current.spec.version}</Badge>{" "}
              <span className="text-ink-soft">
                saved <time dateTime={current.spec.createdAt.toISOString()} title={formatWhenExact(current.spec.createdAt)}>{formatDate(current.spec.createdAt)}</time> by {current.by ?? "Twinleaf"} ·{" "}
                {current.spec.steps.length} steps · {onIt(current.pairs)} on it
              </span>
              {current.spec.note ? <span className="mt-1 block">“{current.spec.note}”</span> : null}
            </p>
            <StepsTable steps={current.spec.steps} caption={`${ROUTE_KIND_LABEL[kind]} of ${code}, version ${current.spec.version}`} testId={`route-${id}-steps`} />
          </>
        ) : (
          <p className="text-ink-soft">This model has no {ROUTE_KIND_LABEL[kind].toLowerCase()} yet: its {what} cannot start on the shop floor until it has one.</p>
        )}
        {earlier.length ? (
          <section aria-labelledby={`earlier-${id}`}>
            <h3 id={`earlier-${id}`} className="mb-2 font-bold">
              Earlier versions
            </h3>
            <ul className="flex flex-col gap-2" data-testid={`route-${id}-earlier`}>
              {earlier.map((v) => (
                <li key={v.spec.id}>
                  <details className="rounded-lg border border-line px-3 py-2">
                    <summary className="cursor-pointer">
                      <span className="font-bold">Version {v.spec.version}</span>{" "}
                      <span className="text-ink-soft">
                        <time dateTime={v.spec.createdAt.toISOString()}>{formatDate(v.spec.createdAt)}</time> by {v.by ?? "Twinleaf"} · {v.spec.steps.length} steps · {onIt(v.pairs)} on it
                      </span>
                      {v.spec.note ? <span className="block">“{v.spec.note}”</span> : null}
                    </summary>
                    <div className="mt-3">
                      <StepsTable steps={v.spec.steps} caption={`${ROUTE_KIND_LABEL[kind]} of ${code}, version ${v.spec.version}`} />
                    </div>
                  </details>
                </li>
              ))}
            </ul>
          </section>
        ) : null}
      </div>
    </Panel>
  );
}

export default async function RoutesPage({ searchParams }: { searchParams: Promise<{ saved?: string; version?: string; kind?: string }> }) {
  await requirePage("admin.reference");
  const sp = await searchParams;
  const overview = await routesOverview(getDb());
  // The notice after a save, shown only for a version that exists.
  const savedKind: RouteKind = isRouteKind(sp.kind) ? sp.kind : "cabinet";
  const savedEntry = overview.find((o) => o.model.code === sp.saved);
  const savedVersion = Number(sp.version);
  const savedList = savedEntry ? (savedKind === "trim" ? savedEntry.trimVersions : savedEntry.versions) : [];
  const saved = savedEntry && savedList.some((v) => v.spec.version === savedVersion) ? { code: savedEntry.model.code, version: savedVersion } : null;

  return (
    <div className="flex flex-col gap-6" data-testid="routes-page">
      <BackLink href="/admin">Administration</BackLink>
      <PageHeader
        title="Routes"
        lead="Each model's routes through the shop: the cabinet route, and for a model with metal trim parts the trim-part route. Each lists its steps in order, the readings each takes with their windows, and the waits after them. Editing a route saves a new version of that route; a pair or part keeps the version it started under, and those not yet started take the newest."
      />
      {saved ? (
        <Notice tone="leaf" testId="route-saved">
          Version {saved.version} of the {ROUTE_KIND_LABEL[savedKind].toLowerCase()} of {saved.code} saved; {savedKind === "cabinet" ? "pairs" : "trim parts"} already on the route keep their version.
        </Notice>
      ) : null}
      {overview.length === 0 ? <p className="text-ink-soft">No active models yet: add one under the register first.</p> : null}
      {overview.map(({ model: m, versions, trimVersions, hasTrim }) => (
        <div key={m.id} className="flex flex-col gap-4">
          <RouteVersions code={m.code} name={m.name} kind="cabinet" versions={versions} />
          {hasTrim || trimVersions.length ? <RouteVersions code={m.code} name={m.name} kind="trim" versions={trimVersions} /> : null}
        </div>
      ))}
    </div>
  );
}
