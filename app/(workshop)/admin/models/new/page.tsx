import type { Metadata } from "next";
import { BackLink } from "@/components/ui/back-link";
import { PageHeader, Panel } from "@/components/ui/panel";
import { requirePage } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { BLANK_MODEL_SPEC } from "@/lib/workshop/model-spec";
import { ModelForm } from "../model-form";

export const metadata: Metadata = { title: "Add a model" };

export default async function NewModelPage() {
  await requirePage("admin.reference");
  return (
    <div className="flex flex-col gap-6" data-testid="new-model-page">
      <BackLink href={paths.adminModels}>Models</BackLink>
      <PageHeader title="Add a model" lead="Registered as version 1 with the workshop's usual cabinet route, which you can then edit under Cabinet routes." />
      <Panel>
        <ModelForm initial={BLANK_MODEL_SPEC} />
      </Panel>
    </div>
  );
}
