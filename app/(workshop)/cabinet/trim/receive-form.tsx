"use client";
import { useActionState, useState } from "react";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { receiveTrimAction } from "./actions";

/** Goods-in of a supplier's delivery: the model and trim position, the supplier, its lot code, how many. */
export function ReceiveForm({ models }: { models: { value: string; label: string; positions: { value: string; label: string }[] }[] }) {
  const [state, action] = useActionState(receiveTrimAction, initialFormState);
  const v = (k: string, d = "") => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : d);
  const [modelId, setModelId] = useState(v("modelId", models[0]?.value ?? ""));
  const positions = models.find((m) => m.value === modelId)?.positions ?? [];
  return (
    <form action={action} className="flex max-w-3xl flex-col gap-4" noValidate data-testid="trim-receive-form">
      {!state.ok && state.message ? (
        <Notice tone="danger" testId="trim-receive-refused">
          {state.message}
        </Notice>
      ) : null}
      <div className="grid gap-4 sm:grid-cols-2">
        <SelectField label="Model" name="modelId" value={modelId} onChange={(e) => setModelId(e.currentTarget.value)} options={[{ value: "", label: "Choose…" }, ...models.map((m) => ({ value: m.value, label: m.label }))]} errors={state.fieldErrors?.modelId} />
        <SelectField key={modelId} label="Trim position" name="position" defaultValue={v("position")} options={[{ value: "", label: positions.length ? "Choose…" : "This model has no trim parts" }, ...positions]} errors={state.fieldErrors?.position} />
        <TextField label="Supplier" name="supplier" defaultValue={v("supplier")} autoComplete="off" errors={state.fieldErrors?.supplier} />
        <TextField label="Supplier's lot code" name="lotCode" defaultValue={v("lotCode")} autoComplete="off" hint="As on the delivery note or the box; a lot received before is found again." errors={state.fieldErrors?.lotCode} />
        <TextField label="Parts received" name="count" type="number" min={1} max={200} defaultValue={v("count", "1")} errors={state.fieldErrors?.count} />
      </div>
      <div>
        <SubmitButton pendingLabel="Receiving…">Receive the parts</SubmitButton>
      </div>
    </form>
  );
}
