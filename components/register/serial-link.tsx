import Link from "next/link";
import { cx } from "@/components/ui/cx";
import { itemHref } from "@/lib/paths";

/** A serial in the monospaced face, linking to its item page. */
export function SerialLink({ identity, bold = true, className, href }: { identity: string; bold?: boolean; className?: string; href?: string }) {
  return (
    <Link href={href ?? itemHref(identity)} className={cx("serial whitespace-nowrap text-leaf-dark underline", bold && "font-bold", className)}>
      {identity}
    </Link>
  );
}
