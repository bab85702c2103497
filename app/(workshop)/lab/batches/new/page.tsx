import type { Metadata } from "next";
import { BackLink } from "@/components/ui/back-link";
import { Panel, PageHeader } from "@/components/ui/panel";
import { requirePage } from "@/lib/auth/guard";
import { BatchForm } from "./batch-form";

export const metadata: Metadata = { title: "Register a batch" };

export default async function Page() {
  await requirePage("lab.work");
  return (
    <div className="flex flex-col gap-6">
      <BackLink href="/lab">Lab</BackLink>
      <PageHeader title="Register a batch of drive units" lead="Units of one part type as they came from the maker. Each gets a Twinleaf serial; print their labels from the batch page." />
      <Panel>
        <BatchForm today={new Date().toISOString().slice(0, 10)} />
      </Panel>
    </div>
  );
}
