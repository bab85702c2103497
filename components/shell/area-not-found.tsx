"use client";
import Link from "next/link";
import { usePathname } from "next/navigation";
import { buttonClasses } from "@/components/ui/button";
import { areaByKey } from "@/lib/areas";

export interface NotFoundThing {
  /** The path under which this kind of record lives, e.g. "/veneer/flitches/". */
  under: string;
  /** What it is, in the workshop's word: "flitch", "cabinet pair". */
  what: string;
  /** The last part of the address is a serial or code a person typed or scanned, safe to repeat. */
  serial?: boolean;
}

/** The part of the address after `under`, as it was typed; null when it cannot be read back. */
function asked(path: string, under: string): string | null {
  const rest = path.slice(under.length).split("/")[0] ?? "";
  try {
    const text = decodeURIComponent(rest).trim();
    return text.length > 0 && text.length <= 32 ? text : null;
  } catch {
    return null;
  }
}

/**
 * An area's "not found": what was asked for and not found, and the way back. A serial is repeated
 * so it can be checked against the label; internal ids (a user's, a message's) are never shown.
 */
export function AreaNotFound({ areaKey, things = [] }: { areaKey: string; things?: NotFoundThing[] }) {
  const area = areaByKey(areaKey);
  const path = usePathname();
  const thing = things.find((t) => path.startsWith(t.under));
  const what = thing?.what ?? "page";
  const serial = thing?.serial ? asked(path, thing.under) : null;
  return (
    <section className="max-w-2xl" data-testid="area-not-found">
      <p className="text-sm font-bold uppercase tracking-wide text-ink-soft">Not found in {area.label}</p>
      <h1 className="mt-2 text-3xl font-bold tracking-tight">
        {serial ? (
          <>
            No {what} <span className="serial">{serial}</span>
          </>
        ) : (
          `This ${what} is not registered`
        )}
      </h1>
      <p className="mt-3 text-ink-soft">
        {serial
          ? "Nothing in the register answers to that. Check it against the label, or type it in the search box above: it also offers the serials one slip away."
          : "The link may be old or mistyped, or the record may have been made somewhere else."}
      </p>
      <div className="mt-6 flex flex-wrap gap-3">
        <Link href={area.href} className={buttonClasses("primary")} data-testid="area-not-found-back">
          Back to {area.label}
        </Link>
        <Link href="/" className={buttonClasses("secondary")}>
          Today
        </Link>
      </div>
    </section>
  );
}
