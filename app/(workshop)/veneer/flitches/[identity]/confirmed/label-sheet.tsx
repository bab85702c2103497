"use client";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";

/**
 * Makes the new pairs' label sheet when asked (A4, 3 × 8: one row per pair with its left
 * cabinet, right cabinet and the pair), shows it and offers it to print. Each press is a
 * recorded print, so the sheet is made by the button, never by opening or reloading the page.
 */
export function LabelSheet({ identities }: { identities: string[] }) {
  const [state, setState] = useState<{ phase: "asked" | "making" | "ready" | "failed"; url?: string; error?: string }>({ phase: "asked" });
  const make = async () => {
    setState({ phase: "making" });
    const res = await fetch("/api/v1/labels", {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ identities, layout: "a4-3x8", printerDpi: 600 }),
    });
    if (!res.ok) {
      const body = await res.json().catch(() => ({}));
      setState({ phase: "failed", error: body.error ?? "The label sheet could not be made." });
      return;
    }
    setState({ phase: "ready", url: URL.createObjectURL(await res.blob()) });
  };
  if (state.phase === "asked")
    return (
      <div className="flex flex-wrap items-center gap-3">
        <Button onClick={make} data-testid="label-sheet-print">
          Print the label sheet
        </Button>
        <span className="text-sm text-ink-soft">A4, 3 × 8 labels of 70 × 37 mm. The print is recorded in each cabinet&apos;s history.</span>
      </div>
    );
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
