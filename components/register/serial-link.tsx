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

/** Text that names serials ("Pair P-PW2-26-00033-Y"): it wraps between words, never inside a serial. */
export function TextWithSerials({ text }: { text: string }) {
  return text.split(" ").map((word, i) => (
    <span key={i}>
      {i ? " " : ""}
      {/\d-|-\d/.test(word) ? <span className="whitespace-nowrap">{word}</span> : word}
    </span>
  ));
}
