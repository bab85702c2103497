"use client";
import { useActionState } from "react";
import { TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { retireModelAction } from "./actions";

/** Retire a model from new work, or bring it back, with the reason kept in its history. */
export function RetireModelForm({ modelId, code, active }: { modelId: string; code: string; active: boolean }) {
  const [state, action] = useActionState(retireModelAction, initialFormState);
  return (
    <form action={action} className="flex flex-col gap-4" noValidate data-testid="retire-model-form">
      {state.message ? <Notice tone={state.ok ? "leaf" : "danger"}>{state.message}</Notice> : null}
      <p className="text-ink-soft">
        {active
          ? `Retiring ${code} takes it out of the veneer plan, lacquer batches, crossover builds and the route editor. Pairs already started carry on, and its history stays.`
          : `Bringing ${code} back offers it to new work again, under its current version.`}
      </p>
      <input type="hidden" name="modelId" value={modelId} />
      <input type="hidden" name="active" value={active ? "false" : "true"} />
      <TextField label="Why" name="reason" errors={state.fieldErrors?.reason} defaultValue={state.ok ? "" : typeof state.values?.reason === "string" ? state.values.reason : ""} />
      <div>
        <SubmitButton variant={active ? "danger" : "primary"} pendingLabel="Saving…">
          {active ? `Retire ${code}` : `Bring ${code} back`}
        </SubmitButton>
      </div>
    </form>
  );
}
