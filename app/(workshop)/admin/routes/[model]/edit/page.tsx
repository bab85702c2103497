import type { Metadata } from "next";
import { count, eq } from "drizzle-orm";
import { notFound } from "next/navigation";
import { BackLink } from "@/components/ui/back-link";
import { PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { models, routeStarts, users } from "@/db/schema";
import { requirePage } from "@/lib/auth/guard";
import { formatDate } from "@/lib/format";
import { defaultRoute } from "@/lib/route/default-spec";
import { currentSpec } from "@/lib/route/server";
import { RouteEditForm } from "./edit-form";

export async function generateMetadata({ params }: { params: Promise<{ model: string }> }): Promise<Metadata> {
  return { title: `Edit the route of ${decodeURIComponent((await params).model)}` };
}

export default async function EditRoutePage({ params }: { params: Promise<{ model: string }> }) {
  await requirePage("admin.reference");
  const db = getDb();
  const code = decodeURIComponent((await params).model).toUpperCase();
  const [model] = await db.select({ id: models.id, code: models.code, name: models.name }).from(models).where(eq(models.code, code)).limit(1);
  if (!model) notFound();
  const current = await currentSpec(db, model.id);
  const [by] = current?.createdBy ? await db.select({ name: users.name }).from(users).where(eq(users.id, current.createdBy)).limit(1) : [];
  const [started] = current ? await db.select({ n: count() }).from(routeStarts).where(eq(routeStarts.specId, current.id)) : [];
  const pairs = Number(started?.n ?? 0);

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
            ? `You are editing version ${current.version} (saved ${formatDate(current.createdAt)} by ${by?.name ?? "Twinleaf"}). Saving makes version ${current.version + 1}; version ${current.version} stays as it is${pairs === 0 ? "." : pairs === 1 ? ", and the one pair already on it keeps it." : `, and the ${pairs} pairs already on it keep it.`} Pairs not yet started take the new version.`
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
