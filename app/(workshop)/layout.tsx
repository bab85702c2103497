import type { ReactNode } from "react";
import { redirect } from "next/navigation";
import { AreaNavigation } from "@/components/shell/area-navigation";
import { SearchBox } from "@/components/shell/search-box";
import { SignOutButton } from "./sign-out-button";
import { AREAS } from "@/lib/areas";
import { currentUser } from "@/lib/auth/guard";
import { ROLE_LABELS } from "@/lib/auth/roles";

/** The signed-in shell. Navigation lists only the areas the user's roles may use. */
export default async function WorkshopLayout({ children }: { children: ReactNode }) {
  const user = await currentUser();
  if (!user) redirect("/sign-in");
  const links = [{ href: "/", label: "Today" }, ...AREAS.filter((a) => user.permissions.has(a.permission)).map((a) => ({ href: a.href, label: a.label }))];
  return (
    <div className="flex min-h-screen flex-col lg:flex-row">
      <AreaNavigation links={links} />
      <div className="flex min-w-0 flex-1 flex-col">
        <header className="flex flex-wrap items-center gap-x-4 gap-y-2 border-b border-line bg-surface/70 px-4 py-3 sm:px-6">
          <div className="w-full sm:w-auto sm:min-w-64 sm:flex-1 md:max-w-md">
            <SearchBox />
          </div>
          <div className="flex min-w-0 flex-1 items-center justify-end gap-3">
            <div className="min-w-0 text-right">
              <p className="truncate font-bold" data-testid="user-name">{user.name}</p>
              <p className="truncate text-sm text-ink-soft" data-testid="user-roles">
                {user.roles.length ? user.roles.map((r) => ROLE_LABELS[r]).join(" · ") : "No roles yet"}
              </p>
            </div>
            <SignOutButton />
          </div>
        </header>
        <main className="mx-auto w-full max-w-6xl flex-1 px-4 py-6 sm:px-6 sm:py-8">{children}</main>
      </div>
    </div>
  );
}
