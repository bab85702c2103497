import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { EventTable } from "@/components/shell/event-table";
import { BackLink } from "@/components/ui/back-link";
import { Badge } from "@/components/ui/badge";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { recentEvents } from "@/lib/events/queries";
import { getUserSummary } from "@/lib/users/queries";
import { ActivationForm, RolesForm } from "./user-forms";

export const metadata: Metadata = { title: "User" };

export default async function UserPage({ params }: { params: Promise<{ id: string }> }) {
  const me = await requirePage("admin.users");
  const id = pageParam((await params).id);
  const db = getDb();
  const user = await getUserSummary(db, id);
  if (!user) notFound();
  const events = await recentEvents(db, { viewer: me, subject: { kind: "user", id: user.id }, limit: 50 });
  return (
    <div className="flex flex-col gap-6">
      <BackLink href="/admin/users">All users</BackLink>
      <PageHeader title={user.name} lead={user.email} actions={<Badge tone={user.status === "active" ? "leaf" : user.status === "invited" ? "info" : "neutral"}>{user.status}</Badge>} />
      <Panel title="What this person may do">
        <RolesForm userId={user.id} roles={user.roles} />
      </Panel>
      <Panel title="Access">
        {user.id === me.id ? (
          <p className="text-ink-soft">This is your own account: another administrator can deactivate it.</p>
        ) : (
          <ActivationForm userId={user.id} active={user.active} name={user.name} />
        )}
      </Panel>
      <Panel title="History">
        <EventTable events={events} caption={`Events about ${user.name}`} />
      </Panel>
    </div>
  );
}
