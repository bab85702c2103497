import { paths } from "@/lib/paths";
import type { Metadata } from "next";
import { BackLink } from "@/components/ui/back-link";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { listFinishes } from "@/lib/workshop/queries";
import { ReceiveForm } from "./receive-form";

export const metadata: Metadata = { title: "Receive a flitch" };

export default async function Page() {
  await requirePage("veneer.work");
  const finishes = await listFinishes(getDb());
  const species = finishes.filter((f) => f.kind === "veneer" && f.active).map((f) => ({ value: f.id, label: f.detail ? `${f.name} (${f.detail})` : f.name }));
  return (
    <div className="flex flex-col gap-6">
      <BackLink href={paths.veneer}>Veneer room</BackLink>
      <PageHeader title="Receive a flitch" lead="The flitch gets its serial and each leaf its number in slicing order. Measure the leaves next, one by one or from a CSV." />
      <Panel>
        <ReceiveForm species={species} today={new Date().toISOString().slice(0, 10)} />
      </Panel>
    </div>
  );
}
