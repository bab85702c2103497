import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { BackLink } from "@/components/ui/back-link";
import { PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { formatDate } from "@/lib/format";
import { defaultRoute } from "@/lib/route/default-spec";
import { routeEditorContext } from "@/lib/route/specs";
import { RouteEditForm } from "./edit-form";

export async function generateMetadata({ params }: { params: Promise<{ model: string }> }): Promise<Metadata> {
  return { title: `Edit the route of ${pageParam((await params).model)}` };
}

export default async function EditRoutePage({ params }: { params: Promise<{ model: string }> }) {
  await requirePage("admin.reference");
  const code = pageParam((await params).model).toUpperCase();
  const context = await routeEditorContext(getDb(), code);
  if (!context) notFound();
  const { model, current, savedBy, pairs } = context;

  return (
    <div className="flex flex-col gap-6" data-testid="route-edit-page">
      <BackLink href="/admin/routes">Cabinet routes</BackLink>
      <PageHeader
        title={
          <>
            Edit the route of {model.name} <span className="serial text-ink-soft">{model.code}</span>
          </>
        }
        lead={
          current
            ? `You are editing version ${current.version} (saved ${formatDate(current.createdAt)} by ${savedBy ?? "Twinleaf"}). Saving makes version ${current.version + 1}; version ${current.version} stays as it is${pairs === 0 ? "." : pairs === 1 ? ", and the one pair already on it keeps it." : `, and the ${pairs} pairs already on it keep it.`} Pairs not yet started take the new version.`
            : "This model has no route yet. The form starts from the workshop's usual route; saving makes version 1."
        }
      />
      <RouteEditForm
        model={{ id: model.id, code: model.code }}
        baseVersion={current?.version ?? 0}
        steps={current?.steps ?? defaultRoute()}
      />
    </div>
  );
}
