import { paths } from "@/lib/paths";
import type { Metadata } from "next";
import { leafList } from "@/lib/veneer/plan";
import { notFound } from "next/navigation";
import { SerialLink } from "@/components/register/serial-link";
import { BackLink } from "@/components/ui/back-link";
import { Notice } from "@/components/ui/notice";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { flitchView } from "@/lib/veneer/flitches";
import { LabelSheet } from "./label-sheet";

const cap = (s: string) => s[0]!.toUpperCase() + s.slice(1);

export const metadata: Metadata = { title: "New pairs" };

/** After confirming: the pairs just made, their cabinets and leaves, and their label sheet. */
export default async function ConfirmedPage({ params, searchParams }: { params: Promise<{ identity: string }>; searchParams: Promise<{ pairs?: string }> }) {
  await requirePage("veneer.work");
  const identity = pageParam((await params).identity);
  const view = await flitchView(getDb(), identity);
  if (!view) notFound();
  const wanted = ((await searchParams).pairs ?? "").split(",").filter(Boolean);
  const pairs = wanted
    .map((pair) => {
      const faces = view.leaves.filter((l) => l.allocation?.pair === pair && l.allocation.role === "face");
      const side = (pos: "L" | "R") => faces.filter((l) => l.allocation!.orientation === (pos === "L" ? "as_cut" : "turned"));
      const cab = (pos: "L" | "R") => side(pos)[0]?.allocation?.cabinet ?? null;
      return {
        pair,
        left: { cabinet: cab("L"), leaves: side("L").map((l) => l.seq) },
        right: { cabinet: cab("R"), leaves: side("R").map((l) => l.seq) },
        reserve: view.leaves.filter((l) => l.allocation?.pair === pair && l.allocation.role === "reserve").map((l) => l.seq),
      };
    })
    .filter((p) => p.left.cabinet && p.right.cabinet);
  if (!pairs.length) notFound();
  const labelOrder = pairs.flatMap((p) => [p.left.cabinet!, p.right.cabinet!, p.pair]);
  return (
    <div className="flex flex-col gap-6" data-testid="confirmed-page">
      <BackLink href={paths.flitch(identity)}>{`Flitch ${identity}`}</BackLink>
      <PageHeader title={`${pairs.length} new pair${pairs.length === 1 ? "" : "s"}`} lead={`From ${identity}, ${view.finish.name}. Stick each cabinet's label inside it before it goes to the press.`} />
      <Notice tone="leaf">The pairs are in the register with their leaves. The label sheet below has one row per pair: left cabinet, right cabinet, pair.</Notice>
      <Panel title="Pairs">
        <ul className="grid gap-4 md:grid-cols-2" data-testid="new-pairs">
          {pairs.map((p) => (
            <li key={p.pair} className="rounded-lg border border-line bg-paper p-4">
              <p className="mb-2">
                <SerialLink identity={p.pair} />
              </p>
              <div className="grid grid-cols-2 gap-3 text-sm">
                <div>
                  <p className="font-bold">Left</p>
                  <SerialLink identity={p.left.cabinet!} bold={false} />
                  <p>{cap(leafList(p.left.leaves))} as cut</p>
                </div>
                <div>
                  <p className="font-bold">Right</p>
                  <SerialLink identity={p.right.cabinet!} bold={false} />
                  <p>{cap(leafList(p.right.leaves))} turned over</p>
                </div>
              </div>
              {p.reserve.length ? <p className="mt-2 text-sm text-ink-soft">Reserve: {leafList(p.reserve)}</p> : null}
            </li>
          ))}
        </ul>
      </Panel>
      <Panel title="Cabinet labels">
        <LabelSheet identities={labelOrder} />
      </Panel>
    </div>
  );
}
