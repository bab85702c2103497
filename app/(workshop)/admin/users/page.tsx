import type { Metadata } from "next";
import Link from "next/link";
import { Badge } from "@/components/ui/badge";
import { DataTable } from "@/components/ui/data-table";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { listUsers } from "@/lib/users/queries";
import { InviteDialog } from "./invite-form";

export const metadata: Metadata = { title: "Users and roles" };

const STATUS_TONE = { active: "leaf", invited: "info", deactivated: "neutral" } as const;

export default async function UsersPage() {
  await requirePage("admin.users");
  const users = await listUsers(getDb());
  return (
    <>
      <PageHeader title="Users and roles" lead="A person may hold several roles. A change applies from their next click; deactivating ends their sessions at once." actions={<InviteDialog />} />
      <Panel>
        <DataTable
          caption="Users"
          testId="user-table"
          initialSort={{ key: "name", dir: "asc" }}
          columns={[
            { key: "name", label: "Name" },
            { key: "email", label: "E-mail" },
            { key: "roles", label: "Roles" },
            { key: "status", label: "Status" },
          ]}
          rows={users.map((u) => ({
            id: u.id,
            cells: {
              name: { value: u.name, display: <Link className="font-bold text-leaf-dark underline underline-offset-4" href={`/admin/users/${u.id}`}>{u.name}</Link> },
              email: { value: u.email },
              roles: { value: u.roles.join(","), display: u.roles.map((r) => ROLE_LABELS[r]).join(", ") || "none" },
              status: { value: u.status, display: <Badge tone={STATUS_TONE[u.status]}>{u.status}</Badge> },
            },
          }))}
        />
      </Panel>
    </>
  );
}
