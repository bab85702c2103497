"use client";
import { useActionState } from "react";
import { TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { MIN_PASSWORD_LENGTH } from "@/lib/auth/password-rules";
import { initialFormState, type FormState } from "@/lib/form-state";

/** Sets a password from a one-time link; used by both invite acceptance and reset. */
export function NewPasswordForm({ token, action: serverAction, submitLabel }: {
  token: string;
  action: (prev: FormState | undefined, formData: FormData) => Promise<FormState>;
  submitLabel: string;
}) {
  const [state, action] = useActionState(serverAction, initialFormState);
  return (
    <form action={action} className="flex flex-col gap-5" noValidate data-testid="new-password-form">
      {state.message && !state.ok ? <Notice tone="danger" testId="new-password-error">{state.message}</Notice> : null}
      <input type="hidden" name="token" value={token} />
      <TextField label="New password" name="password" type="password" autoComplete="new-password" hint={`At least ${MIN_PASSWORD_LENGTH} characters. A short sentence is easy to remember.`} errors={state.fieldErrors?.password} required />
      <TextField label="The same again" name="confirm" type="password" autoComplete="new-password" errors={state.fieldErrors?.confirm} required />
      <SubmitButton pendingLabel="Saving…">{submitLabel}</SubmitButton>
    </form>
  );
}
