import type { Metadata } from "next";
import Link from "next/link";
import { BackLink } from "@/components/ui/back-link";
import { Badge } from "@/components/ui/badge";
import { DataTable } from "@/components/ui/data-table";
import { Notice } from "@/components/ui/notice";
import { PageHeader, Panel } from "@/components/ui/panel";
import { getDb } from "@/db";
import { requirePage } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";
import { countryName } from "@/lib/workshop/countries";
import { referenceUse } from "@/lib/workshop/finishes-dealers";
import { listDealers } from "@/lib/workshop/queries";
import { DealerForm, RetireDealerForm, type DealerValues } from "./dealer-forms";

export const metadata: Metadata = { title: "Dealers" };

const BLANK: DealerValues = { id: null, code: "", name: "", address: "", postcode: "", city: "", country: "", email: "" };

export default async function DealersPage({ searchParams }: { searchParams: Promise<{ edit?: string; saved?: string }> }) {
  await requirePage("admin.reference");
  const sp = await searchParams;
  const db = getDb();
  const [rows, use] = await Promise.all([listDealers(db), referenceUse(db)]);
  const editing = sp.edit ? rows.find((d) => d.code === sp.edit) ?? null : null;
  const used = editing ? use.dealers.get(editing.id) ?? 0 : 0;
  const saved = rows.find((d) => d.code === sp.saved);
  return (
    <div className="flex flex-col gap-6" data-testid="admin-dealers-page">
      <BackLink href={paths.admin}>Administration</BackLink>
      <PageHeader title="Dealers" lead="The shops pairs are shipped to: the delivery address printed on cartons and delivery notes, and the address their notices go to." />
      {saved ? <Notice tone="leaf" testId="dealer-saved">{saved.name} ({saved.code}) saved.</Notice> : null}
      <DataTable
        caption="Dealers"
        testId="admin-dealer-table"
        initialSort={{ key: "name", dir: "asc" }}
        columns={[
          { key: "code", label: "Code" },
          { key: "name", label: "Dealer" },
          { key: "address", label: "Address", sortable: false },
          { key: "country", label: "Country" },
          { key: "email", label: "E-mail" },
          { key: "shipments", label: "Shipments", numeric: true },
          { key: "state", label: "Active" },
          { key: "edit", label: "", sortable: false },
        ]}
        rows={rows.map((d) => ({
          id: d.id,
          cells: {
            code: { value: d.code, display: <span className="serial font-bold">{d.code}</span> },
            name: { value: d.name, display: <Link href={paths.dealer(d.code)} className="underline">{d.name}</Link> },
            address: { value: null, display: <span className="whitespace-pre-line text-sm">{[d.address, [d.postcode, d.city].filter(Boolean).join(" ")].filter(Boolean).join("\n")}</span> },
            country: { value: countryName(d.country), display: `${countryName(d.country)} (${d.country})` },
            email: { value: d.email, display: <span className="break-all text-sm">{d.email}</span> },
            shipments: { value: use.dealers.get(d.id) ?? 0 },
            state: { value: d.active ? "active" : "inactive", display: d.active ? <Badge tone="leaf">active</Badge> : <Badge>inactive</Badge> },
            edit: {
              value: null,
              display: (
                <Link href={`${paths.adminDealers}?edit=${encodeURIComponent(d.code)}#edit`} className="text-leaf-dark underline" data-testid={`edit-dealer-${d.code}`}>
                  Edit
                </Link>
              ),
            },
          },
        }))}
      />
      <div id="edit">
        <Panel title={editing ? `Edit ${editing.name}` : "Add a dealer"}>
          <DealerForm
            key={editing?.id ?? "new"}
            initial={editing ? { id: editing.id, code: editing.code, name: editing.name, address: editing.address, postcode: editing.postcode, city: editing.city, country: editing.country, email: editing.email } : BLANK}
            codeFixed={editing && used > 0 ? `${used} shipments carry ${editing.code}, so the code stays.` : null}
          />
        </Panel>
      </div>
      {editing ? (
        <Panel title={editing.active ? `Mark ${editing.name} inactive` : `Mark ${editing.name} active`}>
          <RetireDealerForm dealerId={editing.id} name={editing.name} active={editing.active} />
        </Panel>
      ) : null}
    </div>
  );
}
