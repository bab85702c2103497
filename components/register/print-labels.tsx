"use client";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";

const LAYOUTS = [
  { value: "thermal-100x50", label: "Thermal label, 100 × 50 mm" },
  { value: "a4-3x8", label: "A4 sheet, 3 × 8 labels (70 × 37 mm)" },
];
const SYMBOLOGIES = [
  { value: "", label: "Usual for this kind" },
  { value: "datamatrix", label: "Data Matrix" },
  { value: "code128", label: "Code 128" },
  { value: "qrcode", label: "QR code (link to this page)" },
  { value: "gs1-128", label: "GS1-128 (cartons)" },
];

/** Prints one item's label as a PDF in a new tab; the print (or reprint) is recorded. */
export function PrintLabels({ identities }: { identities: string[] }) {
  const [layout, setLayout] = useState("thermal-100x50");
  const [symbology, setSymbology] = useState("");
  const [startAt, setStartAt] = useState("1");
  const [dpi, setDpi] = useState("300");
  const [state, setState] = useState<{ busy: boolean; error?: string; done?: string }>({ busy: false });

  const print = async () => {
    setState({ busy: true });
    const res = await fetch("/api/v1/labels", {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ identities, layout, startAt: layout === "a4-3x8" ? Math.max(0, Number(startAt) - 1) : 0, printerDpi: layout === "a4-3x8" ? 600 : Number(dpi), ...(symbology ? { symbology } : {}) }),
    });
    if (!res.ok) {
      const body = await res.json().catch(() => ({}));
      const detail = body.fieldErrors ? Object.values(body.fieldErrors).flat().join(" ") : "";
      setState({ busy: false, error: [body.error ?? "The labels could not be made.", detail].filter(Boolean).join(" ") });
      return;
    }
    const url = URL.createObjectURL(await res.blob());
    window.open(url, "_blank", "noopener");
    setState({ busy: false, done: "Label ready in a new tab. The print is recorded in the history." });
  };

  return (
    <div className="flex flex-col gap-4" data-testid="print-labels">
      {state.error ? <Notice tone="danger">{state.error}</Notice> : null}
      {state.done ? <Notice tone="leaf" testId="print-done">{state.done}</Notice> : null}
      <div className="grid gap-4 sm:grid-cols-3">
        <SelectField label="Label stock" name="layout" value={layout} onChange={(e) => setLayout(e.target.value)} options={LAYOUTS} />
        <SelectField label="Barcode" name="symbology" value={symbology} onChange={(e) => setSymbology(e.target.value)} options={SYMBOLOGIES} />
        {layout === "thermal-100x50" ? (
          <SelectField label="Printer" name="dpi" value={dpi} onChange={(e) => setDpi(e.target.value)} options={[{ value: "203", label: "203 dpi" }, { value: "300", label: "300 dpi" }]} />
        ) : null}
        {layout === "a4-3x8" ? (
          <TextField label="Start at label" name="startAt" type="number" min={1} max={24} value={startAt} onChange={(e) => setStartAt(e.target.value)} hint="For a part-used sheet: 1 is top left, 24 bottom right." />
        ) : null}
      </div>
      <div>
        <Button onClick={print} disabled={state.busy} aria-busy={state.busy}>
          {state.busy ? "Making the PDF…" : identities.length > 1 ? `Print ${identities.length} labels` : "Print label"}
        </Button>
      </div>
    </div>
  );
}
