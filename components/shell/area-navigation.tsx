"use client";
import { usePathname } from "next/navigation";
import { useEffect, useId, useRef, useState } from "react";
import { Wordmark } from "@/components/brand";
import { cx } from "@/components/ui/cx";
import { NavLinks, type NavLink } from "./nav-links";

/**
 * The areas a person may use. From a tablet's landscape width up (Tailwind's lg, 1024 px) they
 * stand in a sidebar; below it they fold behind a menu button, so a phone or a tablet held
 * upright keeps its width for the work. The button is a disclosure: it says whether the list is
 * open and which element it opens; Escape closes it and gives focus back to the button.
 */
export function AreaNavigation({ links }: { links: NavLink[] }) {
  // Open for one page: choosing an area closes it once that area's page has come.
  const path = usePathname();
  const [openOn, setOpenOn] = useState<string | null>(null);
  const open = openOn === path;
  const setOpen = (next: boolean) => setOpenOn(next ? path : null);
  const navId = useId();
  const button = useRef<HTMLButtonElement>(null);

  useEffect(() => {
    if (!open) return;
    const onKey = (e: KeyboardEvent) => {
      if (e.key !== "Escape") return;
      setOpenOn(null);
      button.current?.focus();
    };
    document.addEventListener("keydown", onKey);
    return () => document.removeEventListener("keydown", onKey);
  }, [open]);

  return (
    <aside className="border-b border-line bg-surface lg:sticky lg:top-0 lg:h-screen lg:w-60 lg:shrink-0 lg:overflow-y-auto lg:border-b-0 lg:border-r">
      <div className="flex items-center justify-between gap-3 px-4 py-2 lg:px-5 lg:py-4">
        <Wordmark />
        <button
          ref={button}
          type="button"
          className="inline-flex min-h-12 items-center gap-2 rounded-lg border border-line-strong bg-surface px-4 font-bold text-ink hover:bg-leaf-soft lg:hidden"
          aria-expanded={open}
          aria-controls={navId}
          onClick={() => setOpen(!open)}
          data-testid="area-menu-button"
        >
          <svg width="20" height="20" viewBox="0 0 20 20" aria-hidden="true">
            {open ? (
              <path d="M5 5l10 10M15 5L5 15" stroke="currentColor" strokeWidth="2.2" strokeLinecap="round" />
            ) : (
              <path d="M3 5h14M3 10h14M3 15h14" stroke="currentColor" strokeWidth="2.2" strokeLinecap="round" />
            )}
          </svg>
          Areas
        </button>
      </div>
      <nav id={navId} aria-label="Areas" className={cx("px-3 pb-3 lg:block", open ? "block" : "hidden")} data-testid="area-nav">
        <NavLinks links={links} />
      </nav>
    </aside>
  );
}
