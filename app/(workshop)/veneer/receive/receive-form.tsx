"use client";
import { useActionState } from "react";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { receiveFlitchAction } from "../actions/receive";

export function ReceiveForm({ species, today }: { species: { value: string; label: string }[]; today: string }) {
  const [state, action] = useActionState(receiveFlitchAction, initialFormState);
  const v = (k: string, d = "") => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : d);
  const e = (k: string) => state.fieldErrors?.[k];
  return (
    <form action={action} className="flex max-w-2xl flex-col gap-4" noValidate data-testid="receive-form">
      {!state.ok && state.message ? <Notice tone="danger">{state.message}</Notice> : null}
      <SelectField label="Species" name="finishId" defaultValue={v("finishId")} options={[{ value: "", label: "Choose…" }, ...species]} errors={e("finishId")} required />
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField label="Log or bundle reference" name="logReference" defaultValue={v("logReference")} errors={e("logReference")} hint="As written on the bundle or the supplier's note." required />
        <TextField label="Supplier" name="supplier" defaultValue={v("supplier")} errors={e("supplier")} required />
      </div>
      <div className="grid gap-4 sm:grid-cols-3">
        <TextField label="Date received" name="receivedOn" type="date" defaultValue={v("receivedOn", today)} max={today} errors={e("receivedOn")} required />
        <TextField label="Leaf thickness (mm)" name="leafThicknessMm" inputMode="decimal" defaultValue={v("leafThicknessMm", "0.6")} errors={e("leafThicknessMm")} hint="0.6 mm is typical for decorative veneer." required />
        <TextField label="Number of leaves" name="leafCount" type="number" min={1} max={99} defaultValue={v("leafCount")} errors={e("leafCount")} hint="Numbered 1… in slicing order." required />
      </div>
      <div>
        <SubmitButton pendingLabel="Registering the leaves…">Receive flitch</SubmitButton>
      </div>
    </form>
  );
}
