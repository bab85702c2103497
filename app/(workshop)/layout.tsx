import type { ReactNode } from "react";
import { redirect } from "next/navigation";
import { Wordmark } from "@/components/brand";
import { NavLinks } from "@/components/shell/nav-links";
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
    <div className="flex min-h-screen flex-col md:flex-row">
      <aside className="border-b border-line bg-surface md:sticky md:top-0 md:h-screen md:w-60 md:shrink-0 md:border-b-0 md:border-r">
        <div className="flex items-center justify-between px-5 py-4">
          <Wordmark />
        </div>
        <nav aria-label="Areas" className="px-3 pb-3" data-testid="area-nav">
          <NavLinks links={links} />
        </nav>
      </aside>
      <div className="flex min-w-0 flex-1 flex-col">
        <header className="flex flex-wrap items-center justify-between gap-3 border-b border-line bg-surface/70 px-6 py-3">
          <SearchBox />
          <div className="ml-auto text-right">
            <p className="font-bold" data-testid="user-name">{user.name}</p>
            <p className="text-sm text-ink-soft" data-testid="user-roles">
              {user.roles.length ? user.roles.map((r) => ROLE_LABELS[r]).join(" · ") : "No roles yet"}
            </p>
          </div>
          <SignOutButton />
        </header>
        <main className="mx-auto w-full max-w-6xl flex-1 px-6 py-8">{children}</main>
      </div>
    </div>
  );
}
