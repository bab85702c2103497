"use client";
import { useActionState } from "react";
import { TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { requestResetAction } from "./actions";

export function ResetRequestForm() {
  const [state, action] = useActionState(requestResetAction, initialFormState);
  if (state.ok) return <Notice tone="leaf" testId="reset-requested">{state.message}</Notice>;
  return (
    <form action={action} className="flex flex-col gap-5" noValidate>
      {state.message ? <Notice tone="danger">{state.message}</Notice> : null}
      <TextField label="E-mail" name="email" type="email" autoComplete="username" errors={state.fieldErrors?.email} required />
      <SubmitButton pendingLabel="Sending…">Send me a link</SubmitButton>
    </form>
  );
}
