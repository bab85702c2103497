import type { Metadata } from "next";
import { DealerTable } from "@/components/workshop/reference-tables";
import { BackLink } from "@/components/ui/back-link";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { listDealers } from "@/lib/workshop/queries";

export const metadata: Metadata = { title: "Every dealer" };

export default async function Page() {
  await requirePage("register.read");
  const dealers = await listDealers(getDb());
  return (
    <div className="flex flex-col gap-6" data-testid="every-dealer">
      <BackLink href={paths.register}>Register</BackLink>
      <PageHeader title="Every dealer" lead={`${dealers.length.toLocaleString("en")} dealer${dealers.length === 1 ? "" : "s"}, by name. Click a column to sort; open a dealer for the shipments sent there.`} />
      <Panel>
        <DealerTable dealers={dealers} />
      </Panel>
    </div>
  );
}
