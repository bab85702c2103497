import type { Metadata } from "next";
import Link from "next/link";
import { BackLink } from "@/components/ui/back-link";
import { Badge } from "@/components/ui/badge";
import { DataTable } from "@/components/ui/data-table";
import { PageHeader, Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { formatDate } from "@/lib/format";
import { paths } from "@/lib/paths";
import { ownersForAdmin } from "@/lib/workshop/owners";
import { CorrectOwnerForm, MergeOwnersForm } from "./owner-forms";

export const metadata: Metadata = { title: "Owners" };

export default async function OwnersPage({ searchParams }: { searchParams: Promise<{ edit?: string }> }) {
  await requirePage("admin.reference");
  const sp = await searchParams;
  const rows = await ownersForAdmin(getDb());
  const editing = sp.edit ? rows.find((o) => o.id === sp.edit && !o.mergedInto) ?? null : null;
  const current = rows.filter((o) => !o.mergedInto);
  return (
    <div className="flex flex-col gap-6" data-testid="admin-owners-page">
      <BackLink href={paths.admin}>Administration</BackLink>
      <PageHeader title="Owners" lead="The people registered as owners of pairs. Correct a record, or merge two records of one person; every change keeps its reason and what the record said before." />
      <DataTable
        caption="Owners"
        testId="admin-owner-table"
        initialSort={{ key: "name", dir: "asc" }}
        empty="No owners on record yet."
        columns={[
          { key: "name", label: "Name" },
          { key: "email", label: "E-mail" },
          { key: "town", label: "Town" },
          { key: "country", label: "Country" },
          { key: "pairs", label: "Pairs", numeric: true },
          { key: "since", label: "On record since" },
          { key: "edit", label: "", sortable: false },
        ]}
        rows={rows.map((o) => ({
          id: o.id,
          cells: {
            name: {
              value: o.name,
              display: (
                <>
                  <Link href={paths.owner(o.id)} className="underline">
                    {o.name}
                  </Link>
                  {o.mergedInto ? <Badge className="ml-2">merged into {o.mergedInto}</Badge> : null}
                </>
              ),
            },
            email: { value: o.email ?? "", display: <span className="break-all text-sm">{o.email ?? "—"}</span> },
            town: { value: o.town },
            country: { value: o.country },
            pairs: { value: o.pairs },
            since: { value: o.createdAt.getTime(), display: <time dateTime={o.createdAt.toISOString()}>{formatDate(o.createdAt)}</time> },
            edit: {
              value: null,
              display: o.mergedInto ? null : (
                <Link href={`${paths.adminOwners}?edit=${encodeURIComponent(o.id)}#correct`} className="text-leaf-dark underline">
                  Correct
                </Link>
              ),
            },
          },
        }))}
      />
      {editing ? (
        <div id="correct">
          <Panel title={`Correct ${editing.name}'s record`}>
            <CorrectOwnerForm key={editing.id} owner={{ id: editing.id, name: editing.name, email: editing.email ?? "", town: editing.town, country: editing.country }} />
          </Panel>
        </div>
      ) : null}
      {current.length >= 2 ? (
        <Panel title="Merge two records of one person">
          <MergeOwnersForm owners={current.map((o) => ({ id: o.id, label: `${o.name}${o.email ? ` (${o.email})` : ""}, ${o.town}` }))} />
        </Panel>
      ) : null}
    </div>
  );
}
