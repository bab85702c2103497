import { paths } from "@/lib/paths";
import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { SafetyCautions } from "@/components/shell/safety-cautions";
import { SerialLink } from "@/components/register/serial-link";
import { ContainmentHold } from "@/components/register/containment-hold";
import { Badge } from "@/components/ui/badge";
import { BackLink } from "@/components/ui/back-link";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { areaByKey } from "@/lib/areas";
import { assemblyView, reservedSets } from "@/lib/assembly";
import { sideWord } from "@/lib/vocabulary/sides";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { kindLabel, stateLabel } from "@/lib/vocabulary/item-kinds";
import { isPartType, PART_TYPE_LABEL } from "@/lib/vocabulary/part-types";
import { positionName } from "@/lib/vocabulary/positions";
import { BuildForm, BuiltSpeakers } from "./build-form";

export async function generateMetadata({ params }: { params: Promise<{ pair: string }> }): Promise<Metadata> {
  return { title: `Assembly of ${pageParam((await params).pair)}` };
}

const capitalised = (text: string) => `${text.charAt(0).toUpperCase()}${text.slice(1)}`;
/** A speaker's parts from the cabinet down the baffle to the crossover: CAB, T, M, B, XO. */
const partRank = (position: string) => ({ CAB: 0, T: 1, M: 2, B: 3, XO: 9 })[position.replace(/-?\d+$/, "")] ?? 5;
const PART_TYPE_NAME: Record<string, string> = { tweeter: "Tweeters", midrange: "Midrange units", bass: "Bass units", crossover: "Crossover boards" };

export default async function AssemblyPairPage({ params }: { params: Promise<{ pair: string }> }) {
  await requirePage("assembly.work");
  const db = getDb();
  const view = await assemblyView(db, pageParam((await params).pair));
  if (!view) notFound();
  const { pair, model } = view;
  const built = view.speakers.length > 0;
  const badge = built
    ? { tone: "leaf" as const, text: stateLabel(pair.state) }
    : view.openNcs.length || view.holds.length
      ? { tone: "danger" as const, text: "on hold" }
      : view.blocked
        ? { tone: "caution" as const, text: view.routeFinished ? stateLabel(pair.state) : "on the cabinet route" }
        : { tone: "info" as const, text: "ready to build" };
  const partTypes = new Set<string>([...view.slots.map((s) => s.partType ?? "crossover")]);
  const sets = built || view.blocked ? [] : (await reservedSets(db)).filter((g) => partTypes.has(g.partType)).map((g) => ({ ...g, sets: g.sets.filter((s) => s.model === model.code) }));
  const left = view.speakers.find((s) => s.side === "L");
  const right = view.speakers.find((s) => s.side === "R");

  return (
    <div className="flex flex-col gap-6" data-testid="assembly-pair-page">
      <BackLink href="/assembly">Assembly</BackLink>
      <PageHeader
        title={<span className="serial" data-testid="assembly-pair">{pair.identity}</span>}
        lead={`${model.code} ${model.name}${view.finish ? ` · ${view.finish.name}` : ""}${view.lacquer ? " · lacquer cabinets paired at assembly" : ""}`}
        actions={<Badge tone={badge.tone}>{badge.text}</Badge>}
      />
      <SafetyCautions cautions={areaByKey("assembly").cautions} />

      {!built ? (
        <div className="grid gap-4 md:grid-cols-2" data-testid="assembly-cabinets">
          {(["L", "R"] as const).map((side) => {
            const c = view.cabinets.find((x) => x.side === side);
            return (
              <div key={side} className="rounded-lg border border-line bg-surface p-4">
                <p className="font-bold">{side === "L" ? "Left cabinet" : "Right cabinet"}</p>
                {c ? (
                  <p>
                    <SerialLink identity={c.item.identity} /> <span className="text-ink-soft">({stateLabel(c.item.state)})</span>
                  </p>
                ) : (
                  <p className="text-danger">No {sideWord(side)} cabinet.</p>
                )}
              </div>
            );
          })}
        </div>
      ) : null}

      {built && left && right ? (
        <Panel title="Built">
          <div className="flex flex-col gap-6">
            <Notice tone="leaf" testId="build-done">
              {pair.identity} is built: {left.item.identity} (left) and {right.item.identity} (right).{" "}
              {pair.state === "awaiting_test" ? "It waits for its final pair test." : `It is ${stateLabel(pair.state)} now.`}
            </Notice>
            <BuiltSpeakers left={left.item.identity} right={right.item.identity} />
            <div className="grid gap-4 md:grid-cols-2" data-testid="speaker-parts">
              {view.speakers.map((s) => (
                <section key={s.side} className="rounded-lg border border-line bg-paper p-4">
                  <h3 className="mb-2 font-bold">
                    {s.side === "L" ? "Left" : "Right"} speaker <SerialLink identity={s.item.identity} />
                  </h3>
                  <dl className="grid grid-cols-[max-content_1fr] gap-x-3 gap-y-1">
                    {[...s.parts].sort((x, y) => partRank(x.position) - partRank(y.position) || x.position.localeCompare(y.position, undefined, { numeric: true })).map((p) => (
                      <div key={p.position} className="contents">
                        <dt className="font-bold">{capitalised(positionName(p.position))}</dt>
                        <dd>
                          <SerialLink identity={p.identity} bold={false} />
                          {/* A position the vocabulary does not name says what sits there instead. */}
                          {positionName(p.position) === p.position ? <span className="text-sm text-ink-soft"> {p.partType && isPartType(p.partType) ? PART_TYPE_LABEL[p.partType] : kindLabel(p.kind)}</span> : null}
                        </dd>
                      </div>
                    ))}
                  </dl>
                </section>
              ))}
            </div>
          </div>
        </Panel>
      ) : view.holds.length ? (
        <ContainmentHold holds={view.holds} identity={pair.identity} />
      ) : view.blocked ? (
        <Notice tone={view.openNcs.length ? "danger" : "caution"} testId="assembly-blocked">
          {view.blocked}{" "}
          {!view.routeFinished || view.openNcs.length ? (
            <Link href={paths.cabinetPair(pair.identity)} className="font-bold text-leaf-dark underline">
              See its route
            </Link>
          ) : null}
        </Notice>
      ) : (
        <Panel title="Build the speakers">
          <p className="mb-4 text-ink-soft">
            Scan each part&apos;s label into its field. Left and right of every position, the crossover too, come from one matched set the lab reserved: each part needs its partner on the other side. Every scan is checked as you enter it, and again when you build.
          </p>
          <BuildForm pair={pair.identity} pairId={pair.id} slots={view.slots.map((s) => ({ slot: s.slot, label: s.label, kind: s.kind }))} />
        </Panel>
      )}

      {sets.length ? (
        <Panel title={`Matched sets reserved for the ${model.code}`}>
          <div className="grid gap-4 md:grid-cols-2 xl:grid-cols-3" data-testid="pair-sets">
            {sets.map((g) => (
              <section key={g.partType}>
                <h3 className="mb-1 font-bold">
                  {PART_TYPE_NAME[g.partType] ?? g.partType} <span className="text-sm font-normal text-ink-soft">({g.sets.length})</span>
                </h3>
                {g.sets.length ? (
                  <ul className="flex flex-col gap-1 text-sm">
                    {g.sets.slice(0, 12).map((s) => (
                      <li key={s.code}>
                        <span className="serial font-bold">{s.code}</span>: {s.left ? <SerialLink identity={s.left} bold={false} /> : "—"} and {s.right ? <SerialLink identity={s.right} bold={false} /> : "—"}
                      </li>
                    ))}
                  </ul>
                ) : (
                  <p className="text-sm text-ink-soft">{g.partType === "crossover" ? "None reserved: ask the lab to measure and pair boards." : "None reserved: ask the lab."}</p>
                )}
              </section>
            ))}
          </div>
        </Panel>
      ) : null}
    </div>
  );
}
