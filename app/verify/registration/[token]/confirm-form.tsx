"use client";
import { useActionState } from "react";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { confirmRegistrationAction } from "./actions";

export function ConfirmRegistrationForm({ token }: { token: string }) {
  const [state, action] = useActionState(confirmRegistrationAction, initialFormState);
  if (state.ok) return <Notice tone="leaf" testId="registration-confirmed">{state.message}</Notice>;
  return (
    <form action={action} className="flex flex-col gap-4">
      {state.message ? (
        <Notice tone="danger" testId="registration-refused">
          {state.message}
        </Notice>
      ) : null}
      <input type="hidden" name="token" value={token} />
      <SubmitButton pendingLabel="Confirming…" data-testid="registration-confirm">Confirm my registration</SubmitButton>
    </form>
  );
}
