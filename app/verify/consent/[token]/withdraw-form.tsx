"use client";
import { useActionState } from "react";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { withdrawConsentAction } from "./actions";

export function WithdrawConsentForm({ token }: { token: string }) {
  const [state, action] = useActionState(withdrawConsentAction, initialFormState);
  if (state.ok) return <Notice tone="leaf" testId="consent-withdrawn">{state.message}</Notice>;
  return (
    <form action={action} className="flex flex-col gap-4">
      {state.message ? (
        <Notice tone="danger" testId="consent-refused">
          {state.message}
        </Notice>
      ) : null}
      <input type="hidden" name="token" value={token} />
      <SubmitButton pendingLabel="Withdrawing…" data-testid="consent-withdraw">Withdraw my consent</SubmitButton>
    </form>
  );
}
