import type { Metadata } from "next";
import Link from "next/link";
import { BatchCountsNote, BatchTable } from "@/components/lab/batch-table";
import { BackLink } from "@/components/ui/back-link";
import { buttonClasses } from "@/components/ui/button";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { listBatches } from "@/lib/lab/units";
import { paths } from "@/lib/paths";

export const metadata: Metadata = { title: "Every batch" };

export default async function Page() {
  await requirePage("lab.work");
  const batches = await listBatches(getDb());
  return (
    <div className="flex flex-col gap-6" data-testid="lab-every-batch">
      <BackLink href={paths.lab}>Lab</BackLink>
      <PageHeader
        title="Every batch"
        lead={`${batches.length.toLocaleString("en")} batch${batches.length === 1 ? "" : "es"} of drive units registered, newest first. Click a column to sort.`}
        actions={
          <Link href={paths.labNewBatch} className={buttonClasses("primary")}>
            Register a batch
          </Link>
        }
      />
      <Panel>
        <BatchCountsNote batches={batches} />
        <BatchTable batches={batches} />
      </Panel>
    </div>
  );
}
