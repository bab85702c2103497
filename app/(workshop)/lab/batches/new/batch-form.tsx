"use client";
import { useActionState, useState } from "react";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { batchCountMismatch, splitMakerSerials } from "@/lib/lab/batch-count";
import { registerBatchAction } from "../../actions/batches";

const PARTS = [
  { value: "", label: "Choose…" },
  { value: "tweeter", label: "Tweeter" },
  { value: "midrange", label: "Midrange" },
  { value: "bass", label: "Bass" },
];

export function BatchForm({ today }: { today: string }) {
  const [state, action] = useActionState(registerBatchAction, initialFormState);
  const v = (k: string, d = "") => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : d);
  const e = (k: string) => state.fieldErrors?.[k];
  // What the batch will hold, counted as the server counts it, shown while the serials are scanned.
  const [serialsText, setSerialsText] = useState(() => v("makerSerials"));
  const [countText, setCountText] = useState(() => v("count"));
  const scanned = splitMakerSerials(serialsText).length;
  const typed = Number(countText.trim() || "0");
  const mismatch = Number.isInteger(typed) ? batchCountMismatch(typed, scanned) : null;
  return (
    <form action={action} className="flex max-w-3xl flex-col gap-4" noValidate data-testid="batch-form">
      {!state.ok && state.message ? <Notice tone="danger">{state.message}</Notice> : null}
      <div className="grid gap-4 sm:grid-cols-3">
        <SelectField label="Part type" name="partType" defaultValue={v("partType")} options={PARTS} errors={e("partType")} required />
        <TextField label="Maker's part number" name="partNumber" defaultValue={v("partNumber")} errors={e("partNumber")} required />
        <TextField label="Maker" name="maker" defaultValue={v("maker")} errors={e("maker")} required />
      </div>
      <div className="grid gap-4 sm:grid-cols-3">
        <TextField label="Production or supplier lot" name="lot" defaultValue={v("lot")} errors={e("lot")} required />
        <TextField label="Date received" name="receivedOn" type="date" max={today} defaultValue={v("receivedOn", today)} errors={e("receivedOn")} required />
        <TextField
          label="Number of units"
          name="count"
          type="number"
          min={1}
          max={500}
          defaultValue={v("count")}
          onChange={(ev) => setCountText(ev.currentTarget.value)}
          errors={e("count")}
          hint="Leave empty when you scan the makers' serials below: the batch then holds one unit per serial."
        />
      </div>
      <label className="flex flex-col gap-1">
        <span className="font-bold">Makers’ serials (optional)</span>
        <span className="text-sm text-ink-soft" id="maker-serials-hint">
          Scan each unit’s label, one per line. Each unit still gets its own Twinleaf serial; the maker’s is kept beside it and found by search and in response files.
        </span>
        <textarea
          name="makerSerials"
          rows={6}
          defaultValue={v("makerSerials")}
          onChange={(ev) => setSerialsText(ev.currentTarget.value)}
          aria-describedby="maker-serials-hint maker-serials-count"
          className="rounded-md border border-line-strong bg-surface p-2 font-mono text-sm"
        />
        <span id="maker-serials-count" aria-live="polite" className={`text-sm ${mismatch ? "font-bold text-caution" : "text-ink-soft"}`} data-testid="maker-serials-count">
          {mismatch ?? (scanned ? `${scanned} serial${scanned === 1 ? "" : "s"} scanned: the batch will hold ${scanned} unit${scanned === 1 ? "" : "s"}.` : "")}
        </span>
        {e("makerSerials")?.map((m) => (
          <span key={m} className="text-sm text-danger">
            {m}
          </span>
        ))}
      </label>
      <div>
        <SubmitButton pendingLabel="Registering the units…">Register batch</SubmitButton>
      </div>
    </form>
  );
}
