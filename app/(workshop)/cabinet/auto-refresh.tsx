"use client";
import { useRouter } from "next/navigation";
import { useEffect, useState } from "react";

/** Refreshes the page's data every `seconds` while it is open and visible, and says when it last did. */
export function AutoRefresh({ seconds = 30 }: { seconds?: number }) {
  const router = useRouter();
  const [last, setLast] = useState(() => new Date());
  useEffect(() => {
    const id = setInterval(() => {
      if (document.visibilityState !== "visible") return;
      router.refresh();
      setLast(new Date());
    }, seconds * 1000);
    return () => clearInterval(id);
  }, [router, seconds]);
  return (
    <p className="text-sm text-ink-soft" aria-live="off" data-testid="auto-refresh">
      Updates by itself every {seconds} s · last at {last.toISOString().slice(11, 16)} UTC
    </p>
  );
}
