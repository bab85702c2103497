"use client";
import { useActionState, useId } from "react";
import { TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { pairLacquerAction } from "./actions";

/** Pairs two finished lacquer cabinets of one model and colour; the suggestions are the ones waiting. */
export function LacquerPairForm({ cabinets }: { cabinets: string[] }) {
  const [state, action] = useActionState(pairLacquerAction, initialFormState);
  const listId = `${useId()}-cabinets`;
  const value = (k: string) => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : undefined);
  return (
    <form action={action} className="flex flex-col gap-4" data-testid="lacquer-pair-form">
      {!state.ok && state.message ? <Notice tone="danger">{state.message}</Notice> : null}
      <datalist id={listId}>
        {cabinets.map((c) => (
          <option key={c} value={c} />
        ))}
      </datalist>
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField label="Left cabinet" name="left" list={listId} autoComplete="off" spellCheck={false} className="serial" defaultValue={value("left")} errors={state.fieldErrors?.left} />
        <TextField label="Right cabinet" name="right" list={listId} autoComplete="off" spellCheck={false} className="serial" defaultValue={value("right")} errors={state.fieldErrors?.right} />
      </div>
      <div>
        <SubmitButton pendingLabel="Pairing…">Pair the two cabinets</SubmitButton>
      </div>
    </form>
  );
}
