"use client";
import { useEffect, useRef, useState } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";

/**
 * Makes the new pairs' label sheet as soon as the page opens (A4, 3 × 8: one row per pair with
 * its left cabinet, right cabinet and the pair), shows it and offers it to print. Each print is recorded.
 */
export function LabelSheet({ identities }: { identities: string[] }) {
  const [state, setState] = useState<{ phase: "making" | "ready" | "failed"; url?: string; error?: string }>({ phase: "making" });
  const started = useRef(false);
  const make = async () => {
    setState({ phase: "making" });
    const res = await fetch("/api/v1/labels", {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ identities, layout: "a4-3x8", station: "veneer", printerDpi: 600 }),
    });
    if (!res.ok) {
      const body = await res.json().catch(() => ({}));
      setState({ phase: "failed", error: body.error ?? "The label sheet could not be made." });
      return;
    }
    setState({ phase: "ready", url: URL.createObjectURL(await res.blob()) });
  };
  useEffect(() => {
    if (started.current) return;
    started.current = true;
    void make();
    // eslint-disable-next-line react-hooks/exhaustive-deps -- once, when the page opens
  }, []);
  if (state.phase === "making") return <p role="status" data-testid="label-sheet-making">Making the label sheet…</p>;
  if (state.phase === "failed")
    return (
      <div className="flex flex-col gap-3">
        <Notice tone="danger">{state.error}</Notice>
        <div>
          <Button onClick={make}>Try again</Button>
        </div>
      </div>
    );
  return (
    <div className="flex flex-col gap-3" data-testid="label-sheet">
      <div className="flex flex-wrap gap-3">
        <a href={state.url} target="_blank" rel="noopener" className="inline-flex min-h-12 items-center rounded-lg bg-leaf px-5 font-bold text-white" data-testid="label-sheet-open">
          Open the label sheet to print
        </a>
        <span className="self-center text-sm text-ink-soft">A4, 3 × 8 labels of 70 × 37 mm; print at 100 % (no fit-to-page).</span>
      </div>
      <iframe src={state.url} title="Label sheet" className="h-[32rem] w-full rounded-lg border border-line" />
    </div>
  );
}
