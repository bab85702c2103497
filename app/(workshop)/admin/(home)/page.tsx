import type { Metadata } from "next";
import Link from "next/link";
import { AreaOverview } from "@/components/shell/area-overview";
import { buttonClasses } from "@/components/ui/button";
import { Panel } from "@/components/ui/panel";
import { areaByKey } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { paths } from "@/lib/paths";

export const metadata: Metadata = { title: "Administration" };

const SECTIONS = [
  { href: "/admin/users", title: "Users and roles", text: "Invite people, change what they may do, deactivate those who have left." },
  { href: "/admin/tokens", title: "Machine tokens", text: "Keys for the lab's test benches to post measurements; make one, or revoke one that is lost or retired." },
  { href: "/admin/routes", title: "Routes", text: "Each model's cabinet and trim-part routes through the shop, their readings and waits; edit one as a new version, and see which pairs and parts follow which." },
  { href: "/admin/mail", title: "Mail", text: "Every message Twinleaf queued, whether it was delivered, and the demo's caught mail." },
  { href: paths.adminAudit, title: "Audit trail", text: "Check that no recorded event has been changed, removed or moved outside Twinleaf, and that the database's protective rules are in place." },
  { href: paths.adminModels, title: "Models", text: "Each speaker design: positions, limits, GTIN, warranty and packing list. A change is a new version; pairs in progress keep theirs." },
  { href: paths.adminFinishes, title: "Finishes", text: "Veneer species and lacquer colours; add, edit or retire one." },
  { href: paths.adminDealers, title: "Dealers", text: "The shops pairs go to: delivery address, country and e-mail; add, edit or mark one inactive." },
  { href: paths.adminOwners, title: "Owners", text: "Correct an owner's record or merge two records of one person, each with its reason." },
];

export default async function AdminPage() {
  await requirePage("admin.users");
  return (
    <AreaOverview area={areaByKey("admin")}>
      <div className="grid gap-4 sm:grid-cols-2">
        {SECTIONS.map((s) => (
          <Panel key={s.href} title={s.title}>
            <p className="text-ink-soft">{s.text}</p>
            <Link href={s.href} className={`${buttonClasses("secondary", "sm")} mt-4`}>
              Open
            </Link>
          </Panel>
        ))}
      </div>
    </AreaOverview>
  );
}
