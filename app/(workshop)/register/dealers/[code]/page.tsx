import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { BackLink } from "@/components/ui/back-link";
import { Badge } from "@/components/ui/badge";
import { DataTable } from "@/components/ui/data-table";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { formatDate } from "@/lib/format";
import { dealerWithShipments } from "@/lib/genealogy/queries";
import { SerialLink } from "@/components/register/serial-link";
import { stateLabel } from "@/lib/vocabulary/item-kinds";

export const metadata: Metadata = { title: "Dealer" };

export default async function DealerPage({ params }: { params: Promise<{ code: string }> }) {
  await requirePage("register.read");
  const found = await dealerWithShipments(getDb(), pageParam((await params).code));
  if (!found) notFound();
  const { dealer, shipments } = found;
  return (
    <div className="flex flex-col gap-6" data-testid="dealer-page">
      <BackLink href="/register">Register</BackLink>
      <PageHeader title={dealer.name} lead={`${dealer.city}, ${dealer.country} · ${dealer.email}`} actions={<Badge>{dealer.code}</Badge>} />
      <Panel title={`Shipments (${shipments.length})`}>
        <DataTable
          caption={`Shipments to ${dealer.name}`}
          initialSort={{ key: "date", dir: "desc" }}
          empty="Nothing shipped to this dealer yet."
          columns={[
            { key: "identity", label: "Shipment" },
            { key: "date", label: "Registered" },
            { key: "cartons", label: "Cartons", numeric: true },
            { key: "state", label: "State" },
          ]}
          rows={shipments.map((s) => ({
            id: s.id,
            cells: {
              identity: { value: s.identity, display: <SerialLink identity={s.identity} /> },
              date: { value: s.createdAt.getTime(), display: formatDate(s.createdAt) },
              cartons: { value: s.cartons },
              state: { value: stateLabel(s.state) },
            },
          }))}
        />
      </Panel>
    </div>
  );
}
