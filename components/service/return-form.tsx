"use client";
import { useId, useState } from "react";
import { SelectField, TextField } from "@/components/ui/field";
import { submitKeepingFields, useActionStateThen } from "@/components/ui/kept-form";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import { initialFormState, type FormState } from "@/lib/form-state";

/** Where the repaired speaker goes and how; every field is kept when the action answers with a problem. */
export function ReturnForm({
  code,
  today,
  choices,
  action,
}: {
  code: string;
  today: string;
  choices: { value: "owner" | "dealer"; label: string }[];
  action: (state: FormState, formData: FormData) => Promise<FormState>;
}) {
  const [to, setTo] = useState(choices.length === 1 ? choices[0]!.value : "");
  const [shippedOn, setShippedOn] = useState(today);
  const [carrier, setCarrier] = useState("");
  const [tracking, setTracking] = useState("");
  const [state, run, pending] = useActionStateThen(action, initialFormState, () => undefined);
  const submit = submitKeepingFields(run, pending);
  const id = useId();
  const errors = (field: string) => (!state.ok ? state.fieldErrors?.[field] : undefined);
  return (
    <form id={id} onSubmit={submit} aria-busy={pending} className="flex flex-col gap-4" noValidate data-testid="return-form">
      {state.message ? (
        <Notice tone={state.ok ? "leaf" : "danger"} testId={state.ok ? "sent-back" : "return-refused"}>
          {state.message}
        </Notice>
      ) : null}
      <input type="hidden" name="code" value={code} />
      <div className="grid gap-4 sm:grid-cols-2">
        <SelectField label="Send it to" name="to" value={to} onChange={(e) => setTo(e.currentTarget.value)} errors={errors("to")} options={[{ value: "", label: "Choose…" }, ...choices]} />
        <TextField label="Shipped on" type="date" name="shippedOn" value={shippedOn} max={today} onChange={(e) => setShippedOn(e.currentTarget.value)} errors={errors("shippedOn")} />
        <TextField label="Carrier" name="carrier" value={carrier} onChange={(e) => setCarrier(e.currentTarget.value)} autoComplete="off" errors={errors("carrier")} />
        <TextField label="Tracking number" name="tracking" value={tracking} onChange={(e) => setTracking(e.currentTarget.value)} className="serial" autoComplete="off" spellCheck={false} errors={errors("tracking")} />
      </div>
      <div>
        <Button type="submit" disabled={pending} aria-busy={pending}>
          {pending ? "Shipping…" : "Pack and ship it back"}
        </Button>
      </div>
    </form>
  );
}
