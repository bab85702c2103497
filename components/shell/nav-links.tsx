"use client";
import Link from "next/link";
import { usePathname } from "next/navigation";
import { cx } from "@/components/ui/cx";

export function NavLinks({ links }: { links: { href: string; label: string }[] }) {
  const path = usePathname();
  return (
    <ul className="flex flex-wrap gap-1 md:flex-col">
      {links.map((l) => {
        const current = l.href === "/" ? path === "/" : path === l.href || path.startsWith(`${l.href}/`);
        return (
          <li key={l.href}>
            <Link
              href={l.href}
              aria-current={current ? "page" : undefined}
              className={cx(
                "flex min-h-12 items-center rounded-lg px-3 font-bold",
                current ? "bg-leaf text-white" : "text-ink hover:bg-leaf-soft",
              )}
            >
              {l.label}
            </Link>
          </li>
        );
      })}
    </ul>
  );
}
