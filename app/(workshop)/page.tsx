import type { Metadata } from "next";
import Link from "next/link";
import { EventTable } from "@/components/shell/event-table";
import { buttonClasses } from "@/components/ui/button";
import { Panel, PageHeader } from "@/components/ui/panel";
import { getDb } from "@/db";
import { AREAS } from "@/lib/areas";
import { requirePage } from "@/lib/auth/guard";
import { recentEvents } from "@/lib/events/queries";
import { now } from "@/lib/clock";
import { formatDay, timesNote } from "@/lib/format";
import { listUsers } from "@/lib/users/queries";

export const metadata: Metadata = { title: "Today" };

/** What waits for me today: my areas, and what was last recorded at their stations. */
export default async function TodayPage() {
  const user = await requirePage("register.read");
  const db = getDb();
  const mine = AREAS.filter((a) => a.key !== "register" && user.permissions.has(a.permission));
  const isAdmin = user.permissions.has("admin.users");
  const stations = [...new Set(mine.flatMap((a) => a.stations))];
  // What was recorded at my areas' stations; an administrator's Today shows the whole log.
  const events = isAdmin ? await recentEvents(db, { viewer: user, limit: 20 }) : stations.length ? await recentEvents(db, { viewer: user, stations, limit: 20 }) : [];
  const people = isAdmin ? await listUsers(db) : [];
  const at = now();

  return (
    <div className="flex flex-col gap-6" data-testid="today">
      <PageHeader title={`Hello, ${user.name.split(" ")[0]}`} lead={formatDay(at, at)} />
      {mine.length === 0 ? (
        <Panel>
          <p>Your account has no roles yet, so there is no station work for you. You can still read the register. An administrator can give you roles.</p>
        </Panel>
      ) : (
        <div className="grid gap-4 sm:grid-cols-2">
          {mine.map((a) => (
            <Panel key={a.key} title={a.label}>
              <p className="text-ink-soft">{a.summary}</p>
              <Link href={a.href} className={`${buttonClasses("primary")} mt-4`}>
                Open {a.label.toLowerCase()}
              </Link>
            </Panel>
          ))}
        </div>
      )}
      {isAdmin ? (
        <Panel title="People" actions={<Link href="/admin/users" className={buttonClasses("secondary", "sm")}>Manage users</Link>}>
          <p data-testid="people-summary">
            {people.filter((p) => p.status === "active").length} active, {people.filter((p) => p.status === "invited").length} invited,{" "}
            {people.filter((p) => p.status === "deactivated").length} deactivated.
          </p>
        </Panel>
      ) : null}
      <Panel title={isAdmin ? "Latest in the register" : "Latest at your stations"}>
        <EventTable events={events} caption="Latest events" empty="Nothing recorded at your stations yet." />
        <p className="mt-2 text-sm text-ink-soft" data-testid="times-note">
          {timesNote()}
        </p>
      </Panel>
    </div>
  );
}
