import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { BackLink } from "@/components/ui/back-link";
import { DataTable } from "@/components/ui/data-table";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { pageParam, requirePage } from "@/lib/auth/guard";
import { formatDate } from "@/lib/format";
import { ownerWithItems } from "@/lib/genealogy/queries";
import { SerialLink } from "@/components/register/serial-link";
import { kindLabel, stateLabel } from "@/lib/vocabulary/item-kinds";
import { OwnerRegistrations } from "@/components/register/owner-registrations";
import { now } from "@/lib/clock";
import { ownerById } from "@/lib/owners";
import { registrationsOfOwner } from "@/lib/owners/registrations";

export const metadata: Metadata = { title: "Owner" };

export default async function OwnerPage({ params }: { params: Promise<{ id: string }> }) {
  await requirePage("register.read");
  const found = await ownerWithItems(getDb(), pageParam((await params).id));
  if (!found) notFound();
  const { owner, held } = found;
  const [registrations, withConsent] = await Promise.all([registrationsOfOwner(getDb(), owner.id), ownerById(getDb(), owner.id)]);
  const consent = withConsent?.consent;
  return (
    <div className="flex flex-col gap-6" data-testid="owner-page">
      <BackLink href="/register">Register</BackLink>
      <PageHeader title={owner.name} lead={[`${owner.town}, ${owner.country}`, owner.email].filter(Boolean).join(" · ")} />
      <Panel title="Registered as owning">
        <DataTable
          caption={`What ${owner.name} owns`}
          empty="Nothing registered."
          columns={[
            { key: "identity", label: "Serial" },
            { key: "kind", label: "Kind" },
            { key: "since", label: "Since" },
            { key: "state", label: "State" },
          ]}
          rows={held.map((h) => ({
            id: h.identity,
            cells: {
              identity: { value: h.identity, display: <SerialLink identity={h.identity} /> },
              kind: { value: kindLabel(h.kind) },
              since: { value: h.since.getTime(), display: formatDate(h.since) },
              state: { value: stateLabel(h.state) },
            },
          }))}
        />
      </Panel>
      <Panel title="Consent and registrations">
        <p className="mb-3" data-testid="owner-consent">
          {consent
            ? consent.given
              ? `Consents to recall notices and service mail (since ${formatDate(consent.at, now())}).`
              : `Does not wish to be contacted (since ${formatDate(consent.at, now())}).`
            : "No word on being contacted is recorded."}
        </p>
        <OwnerRegistrations rows={registrations} show="pair" now={now()} />
      </Panel>
    </div>
  );
}
