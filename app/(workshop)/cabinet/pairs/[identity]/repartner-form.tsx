"use client";
import { useActionState } from "react";
import { TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { repartnerAction } from "../../actions/steps";

/** Quality's sign-off for a new partner cabinet of the same model and finish. */
export function RepartnerForm({ pair, pairId }: { pair: string; pairId: string }) {
  const [state, action] = useActionState(repartnerAction, initialFormState);
  return (
    <form action={action} className="flex max-w-2xl flex-col gap-4" data-testid="repartner-form">
      {state.message ? <Notice tone={state.ok ? "leaf" : "danger"}>{state.message}</Notice> : null}
      <input type="hidden" name="pair" value={pair} />
      <input type="hidden" name="pairId" value={pairId} />
      <TextField label="New cabinet (scan or type)" name="cabinet" errors={state.fieldErrors?.cabinet} hint="Same model and finish, in no pair. It starts the route from the first step." />
      <TextField label="Reason for the sign-off" name="reason" errors={state.fieldErrors?.reason} />
      <div>
        <SubmitButton pendingLabel="Signing off…">Sign off the new partner</SubmitButton>
      </div>
    </form>
  );
}
