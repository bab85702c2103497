"use client";
import { useRouter } from "next/navigation";
import { useEffect } from "react";

/**
 * Refreshes the page's data every `seconds` while it is open and visible. `readAt` is when the
 * server read the data shown, already in the workshop's time zone (the browser does not know it).
 */
export function AutoRefresh({ seconds = 30, readAt }: { seconds?: number; readAt: string }) {
  const router = useRouter();
  useEffect(() => {
    const id = setInterval(() => {
      if (document.visibilityState === "visible") router.refresh();
    }, seconds * 1000);
    return () => clearInterval(id);
  }, [router, seconds]);
  return (
    <p className="text-sm text-ink-soft" aria-live="off" data-testid="auto-refresh">
      Updates by itself every {seconds} s · last at {readAt}
    </p>
  );
}
