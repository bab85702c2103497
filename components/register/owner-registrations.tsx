import Link from "next/link";
import { DataTable } from "@/components/ui/data-table";
import { formatDate } from "@/lib/format";
import type { RegistrationRow } from "@/lib/owners/registrations";
import { paths } from "@/lib/paths";

const STATUS_WORDS: Record<RegistrationRow["status"], string> = {
  pending: "Waiting for the owner to confirm",
  confirmed: "Confirmed",
  expired: "Not confirmed (link expired)",
};

/**
 * Owners' own registrations from the certificate check, pending and confirmed, with whether mail
 * may go to them. `show` picks the column that differs: the owner on a pair's page, the pair on an owner's.
 */
export function OwnerRegistrations({ rows, show, now }: { rows: RegistrationRow[]; show: "owner" | "pair"; now: Date }) {
  return (
    <DataTable
      testId="owner-registrations"
      caption="Registrations made by owners from the certificate check"
      empty="No owner has registered from the certificate check."
      columns={[
        show === "owner" ? { key: "who", label: "Owner" } : { key: "pair", label: "Pair" },
        { key: "email", label: "E-mail" },
        { key: "where", label: "Town" },
        { key: "status", label: "Registration" },
        { key: "consent", label: "Recall notices and service mail" },
        { key: "sent", label: "Sent" },
      ]}
      rows={rows.map((r) => ({
        id: r.id,
        cells: {
          who: { value: r.name, display: r.ownerId ? <Link className="font-bold underline" href={paths.owner(r.ownerId)}>{r.name}</Link> : r.name },
          pair: { value: r.pair, display: <Link className="serial underline" href={paths.item(r.pair)}>{r.pair}</Link> },
          email: { value: r.email },
          where: { value: `${r.town}, ${r.country}` },
          status: { value: r.status, display: r.confirmedAt ? `${STATUS_WORDS.confirmed} ${formatDate(r.confirmedAt, now)}` : STATUS_WORDS[r.status] },
          consent: { value: r.consent ? 1 : 0, display: r.consent ? "Consented" : "No consent" },
          sent: { value: r.createdAt.getTime(), display: formatDate(r.createdAt, now) },
        },
      }))}
    />
  );
}
