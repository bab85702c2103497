"use client";
import { useActionState } from "react";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { makeLacquerAction } from "./actions";

export function MakeForm({ models, colours }: { models: { value: string; label: string }[]; colours: { value: string; label: string }[] }) {
  const [state, action] = useActionState(makeLacquerAction, initialFormState);
  const v = (k: string, d = "") => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : d);
  return (
    <form action={action} className="flex max-w-2xl flex-col gap-4" noValidate data-testid="lacquer-form">
      {!state.ok && state.message ? <Notice tone="danger">{state.message}</Notice> : null}
      <div className="grid gap-4 sm:grid-cols-3">
        <SelectField label="Model" name="modelId" defaultValue={v("modelId")} options={[{ value: "", label: "Choose…" }, ...models]} errors={state.fieldErrors?.modelId} />
        <SelectField label="Lacquer colour" name="finishId" defaultValue={v("finishId")} options={[{ value: "", label: "Choose…" }, ...colours]} errors={state.fieldErrors?.finishId} />
        <TextField label="Cabinets" name="count" type="number" min={2} max={40} defaultValue={v("count", "4")} errors={state.fieldErrors?.count} hint="Paired at assembly, two at a time." />
      </div>
      <div>
        <SubmitButton pendingLabel="Making the cabinets…">Make the cabinets</SubmitButton>
      </div>
    </form>
  );
}
