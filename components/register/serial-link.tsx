import Link from "next/link";
import { cx } from "@/components/ui/cx";
import { itemHref } from "@/lib/paths";

/**
 * A serial in the monospaced face, linking to its item page. A serial is never broken; a name with
 * spaces (a maker's lot, "<maker> lot <lot>") wraps at its spaces like words.
 */
export function SerialLink({ identity, bold = true, className, href }: { identity: string; bold?: boolean; className?: string; href?: string }) {
  return (
    <Link href={href ?? itemHref(identity)} className={cx("serial text-leaf-dark underline", !identity.includes(" ") && "whitespace-nowrap", bold && "font-bold", className)}>
      {identity}
    </Link>
  );
}
