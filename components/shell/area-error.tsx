"use client";
import Link from "next/link";
import { useEffect, useRef } from "react";
import { Button, buttonClasses } from "@/components/ui/button";
import { areaByKey } from "@/lib/areas";

/**
 * What an area shows when one of its pages fails: a plain message and a way to try again. The
 * error itself is for the server's log (Next keeps its details out of production pages anyway);
 * it is never shown, since it would mean nothing at a station and might say too much.
 */
export function AreaError({ areaKey, error, retry }: { areaKey: string; error: unknown; retry: () => void }) {
  const area = areaByKey(areaKey);
  const heading = useRef<HTMLHeadingElement>(null);
  useEffect(() => {
    console.error(error);
    // Whoever was working here hears what happened, and the keyboard starts from the message.
    heading.current?.focus();
  }, [error]);
  return (
    <section className="max-w-2xl rounded-xl border-2 border-danger/40 bg-surface p-6" data-testid="area-error">
      <p className="text-sm font-bold uppercase tracking-wide text-danger">{area.label}</p>
      <h1 ref={heading} tabIndex={-1} className="mt-2 text-3xl font-bold tracking-tight outline-none">
        This page could not be shown
      </h1>
      <p className="mt-3">
        Something went wrong while Twinleaf was preparing it. Try again; if it happens again, note the time and what you were doing, and tell whoever looks after Twinleaf here.
      </p>
      <p className="mt-2 text-ink-soft">If you were saving something, check whether it was recorded before you enter it again.</p>
      <div className="mt-6 flex flex-wrap gap-3">
        <Button onClick={() => retry()} data-testid="area-error-retry">
          Try again
        </Button>
        <Link href={area.href} className={buttonClasses("secondary")}>
          Back to {area.label}
        </Link>
      </div>
    </section>
  );
}
