"use client";
import { TextAreaField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { Button } from "@/components/ui/button";
import { useState } from "react";
import { submitKeepingFields, useActionStateThen } from "@/components/ui/kept-form";
import { initialFormState, type FormState } from "@/lib/form-state";

type Action = (state: FormState, formData: FormData) => Promise<FormState>;

/** A containment's one-field forms (the notices' words for owners, the closing reason): the answer shows above the field. */
export function ContainmentTextForm({
  code,
  action,
  field,
  label,
  hint,
  button,
  pendingLabel,
  testId,
  variant = "primary",
}: {
  code: string;
  action: Action;
  field: "ownerWords" | "reason";
  label: string;
  hint?: string;
  button: string;
  pendingLabel: string;
  testId: string;
  variant?: "primary" | "secondary";
}) {
  const [text, setText] = useState("");
  const [state, formAction, pending] = useActionStateThen(action, initialFormState, () => setText(""));
  const submit = submitKeepingFields(formAction, pending);
  return (
    <form onSubmit={submit} className="flex flex-col gap-4" data-testid={testId} noValidate>
      <input type="hidden" name="code" value={code} />
      {state.message ? (
        <Notice tone={state.ok ? "leaf" : "danger"} testId={`${testId}-answer`}>
          {state.message}
        </Notice>
      ) : null}
      <TextAreaField label={label} name={field} rows={3} value={text} onChange={(e) => setText(e.currentTarget.value)} errors={!state.ok ? state.fieldErrors?.[field] : undefined} hint={hint} maxLength={field === "reason" ? 2000 : 1000} />
      <div>
        <Button type="submit" variant={variant} disabled={pending} aria-busy={pending}>
          {pending ? pendingLabel : button}
        </Button>
      </div>
    </form>
  );
}
