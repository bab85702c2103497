"use client";
import Link, { useLinkStatus } from "next/link";
import { usePathname } from "next/navigation";
import { cx } from "@/components/ui/cx";

export interface NavLink {
  href: string;
  label: string;
}

/** Whether a link is the area the page belongs to: "/" only for itself, an area for all below it. */
export function isCurrent(href: string, path: string): boolean {
  return href === "/" ? path === "/" : path === href || path.startsWith(`${href}/`);
}

/**
 * While the page a link opens is on its way: a turning mark beside the link and "opening" for a
 * screen reader. Every workshop page reads the register when asked, so an area opens only once it
 * has answered; a loading.tsx would show sooner, but it would also start the answer before a
 * page can say "not yours" (403) or "not found" (404), and those must stay true answers.
 */
function Opening() {
  const { pending } = useLinkStatus();
  return (
    <>
      <svg
        viewBox="0 0 24 24"
        aria-hidden="true"
        className={cx("ml-auto size-5 shrink-0 transition-opacity", pending ? "opacity-100 delay-150 motion-safe:animate-spin" : "opacity-0")}
      >
        <circle cx="12" cy="12" r="9" fill="none" stroke="currentColor" strokeOpacity="0.25" strokeWidth="3" />
        <path d="M21 12a9 9 0 0 0-9-9" fill="none" stroke="currentColor" strokeWidth="3" strokeLinecap="round" />
      </svg>
      <span role="status" className="sr-only">
        {pending ? "opening…" : ""}
      </span>
    </>
  );
}

export function NavLinks({ links }: { links: NavLink[] }) {
  const path = usePathname();
  return (
    <ul className="flex flex-col gap-1">
      {links.map((l) => {
        const current = isCurrent(l.href, path);
        return (
          <li key={l.href}>
            <Link
              href={l.href}
              aria-current={current ? "page" : undefined}
              className={cx("flex min-h-12 items-center gap-2 rounded-lg px-3 font-bold", current ? "bg-leaf text-white" : "text-ink hover:bg-leaf-soft")}
            >
              {l.label}
              <Opening />
            </Link>
          </li>
        );
      })}
    </ul>
  );
}
