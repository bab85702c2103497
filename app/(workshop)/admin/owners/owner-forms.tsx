"use client";
import { useActionState } from "react";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { correctOwnerAction, mergeOwnersAction } from "./actions";

export interface OwnerValues {
  id: string;
  name: string;
  email: string;
  town: string;
  country: string;
}

/** Correct one owner's record, with the reason kept in its history. */
export function CorrectOwnerForm({ owner }: { owner: OwnerValues }) {
  const [state, action] = useActionState(correctOwnerAction, initialFormState);
  const v = (k: keyof OwnerValues) => (!state.ok && typeof state.values?.[k] === "string" ? (state.values[k] as string) : owner[k]);
  const fe = state.fieldErrors;
  return (
    <form action={action} className="flex flex-col gap-4" noValidate data-testid="correct-owner-form">
      {state.message ? <Notice tone={state.ok ? "leaf" : "danger"} testId="correct-owner-message">{state.message}</Notice> : null}
      <input type="hidden" name="ownerId" value={owner.id} />
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField label="Name" name="name" defaultValue={v("name")} errors={fe?.name} autoComplete="off" />
        <TextField label="E-mail" name="email" type="email" defaultValue={v("email")} errors={fe?.email} autoComplete="off" />
        <TextField label="Town" name="town" defaultValue={v("town")} errors={fe?.town} autoComplete="off" />
        <TextField label="Country" name="country" defaultValue={v("country")} hint="Two-letter ISO 3166-1 code." errors={fe?.country} maxLength={2} className="uppercase" autoComplete="off" />
      </div>
      <TextField label="Why" name="reason" defaultValue={state.ok ? "" : typeof state.values?.reason === "string" ? state.values.reason : ""} hint="Required: kept with the correction, with what the record said before." errors={fe?.reason} />
      <div>
        <SubmitButton pendingLabel="Saving…">Correct the record</SubmitButton>
      </div>
    </form>
  );
}

/** Merge two records of one person: the duplicate's pairs and consent go to the one kept. */
export function MergeOwnersForm({ owners }: { owners: { id: string; label: string }[] }) {
  const [state, action] = useActionState(mergeOwnersAction, initialFormState);
  const v = (k: string) => (!state.ok && typeof state.values?.[k] === "string" ? (state.values[k] as string) : "");
  const fe = state.fieldErrors;
  const options = [{ value: "", label: "Choose a record" }, ...owners.map((o) => ({ value: o.id, label: o.label }))];
  return (
    <form action={action} className="flex flex-col gap-4" noValidate data-testid="merge-owners-form">
      {state.message ? <Notice tone={state.ok ? "leaf" : "danger"} testId="merge-owners-message">{state.message}</Notice> : null}
      <div className="grid gap-4 sm:grid-cols-2">
        <SelectField label="Keep this record" name="keepId" defaultValue={v("keepId")} options={options} errors={fe?.keepId} />
        <SelectField label="Merge this duplicate into it" name="mergeId" defaultValue={v("mergeId")} options={options} errors={fe?.mergeId} />
      </div>
      <TextField label="Why" name="reason" defaultValue={v("reason")} hint="Required, e.g. the same person registered twice with two addresses." errors={fe?.reason} />
      <p className="text-sm text-ink-soft">The duplicate stays on record as merged, pointing at the one kept; its pairs are registered to the one kept from the same day, and its newer word on being contacted carries over.</p>
      <div>
        <SubmitButton pendingLabel="Merging…">Merge the records</SubmitButton>
      </div>
    </form>
  );
}
