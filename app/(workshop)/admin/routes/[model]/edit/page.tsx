import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { BackLink } from "@/components/ui/back-link";
import { PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { formatDate } from "@/lib/format";
import { defaultRoute, defaultTrimRoute } from "@/lib/route/default-spec";
import { isRouteKind, ROUTE_KIND_LABEL, type RouteKind } from "@/lib/vocabulary/route-kinds";
import { routeEditorContext } from "@/lib/route/specs";
import { RouteEditForm } from "./edit-form";

export async function generateMetadata({ params }: { params: Promise<{ model: string }> }): Promise<Metadata> {
  return { title: `Edit the route of ${pageParam((await params).model)}` };
}

export default async function EditRoutePage({ params, searchParams }: { params: Promise<{ model: string }>; searchParams: Promise<{ kind?: string }> }) {
  await requirePage("admin.reference");
  const code = pageParam((await params).model).toUpperCase();
  const asked = (await searchParams).kind;
  // The kind of route is in the URL (?kind=trim); no kind is the cabinet route, an unknown one is no page.
  if (asked !== undefined && !isRouteKind(asked)) notFound();
  const routeKind: RouteKind = asked ?? "cabinet";
  const context = await routeEditorContext(getDb(), code, routeKind);
  if (!context) notFound();
  const { model, current, savedBy, pairs } = context;
  const what = routeKind === "cabinet" ? "pair" : "trim part";

  return (
    <div className="flex flex-col gap-6" data-testid="route-edit-page">
      <BackLink href="/admin/routes">Routes</BackLink>
      <PageHeader
        title={
          <>
            Edit the {ROUTE_KIND_LABEL[routeKind].toLowerCase()} of {model.name} <span className="serial text-ink-soft">{model.code}</span>
          </>
        }
        lead={
          current
            ? `You are editing version ${current.version} (saved ${formatDate(current.createdAt)} by ${savedBy ?? "Twinleaf"}). Saving makes version ${current.version + 1}; version ${current.version} stays as it is${pairs === 0 ? "." : `, and the ${pairs === 1 ? `one ${what} already on it keeps` : `${pairs} ${what}s already on it keep`} it.`} ${what === "pair" ? "Pairs" : "Trim parts"} not yet started take the new version.`
            : `This model has no ${ROUTE_KIND_LABEL[routeKind].toLowerCase()} yet. The form starts from the workshop's usual one; saving makes version 1.`
        }
      />
      <RouteEditForm
        model={{ id: model.id, code: model.code }}
        routeKind={routeKind}
        baseVersion={current?.version ?? 0}
        steps={current?.steps ?? (routeKind === "trim" ? defaultTrimRoute() : defaultRoute())}
      />
    </div>
  );
}
