"use client";
import { useActionState, useEffect } from "react";
import { Dialog } from "@/components/ui/dialog";
import { CheckboxGroup, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { useToast } from "@/components/ui/toast";
import { ROLE_LABELS, ROLES, type Role } from "@/lib/auth/roles";
import { initialFormState, type FormState } from "@/lib/form-state";
import { deactivateAction } from "../actions/deactivate";
import { reactivateAction } from "../actions/reactivate";
import { setRolesAction } from "../actions/set-roles";

const roleOptions = ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r] }));

function useToastOnSuccess(state: FormState) {
  const toast = useToast();
  useEffect(() => {
    if (state.ok && state.message) toast(state.message);
  }, [state, toast]);
}

export function RolesForm({ userId, roles }: { userId: string; roles: Role[] }) {
  const [state, action] = useActionState(setRolesAction, initialFormState);
  useToastOnSuccess(state);
  return (
    <form action={action} className="flex flex-col gap-4" noValidate data-testid="roles-form">
      {!state.ok && state.message ? <Notice tone="danger" testId="roles-error">{state.message}</Notice> : null}
      <input type="hidden" name="userId" value={userId} />
      {/* Keyed on the saved roles so the boxes show what was stored after each save. */}
      <CheckboxGroup key={roles.join()} legend="Roles held" name="roles" options={roleOptions} defaultValues={roles} errors={state.fieldErrors?.roles} />
      <TextField label="Why (optional)" name="reason" hint="Kept with the change in the event log." errors={state.fieldErrors?.reason} />
      <div>
        <SubmitButton pendingLabel="Saving…">Save roles</SubmitButton>
      </div>
    </form>
  );
}

export function ActivationForm({ userId, active, name }: { userId: string; active: boolean; name: string }) {
  const [state, action] = useActionState(active ? deactivateAction : reactivateAction, initialFormState);
  useToastOnSuccess(state);
  if (!active) {
    return (
      <form action={action} data-testid="reactivate-form">
        {!state.ok && state.message ? <Notice tone="danger">{state.message}</Notice> : null}
        <input type="hidden" name="userId" value={userId} />
        <SubmitButton variant="secondary" pendingLabel="Reactivating…">Reactivate</SubmitButton>
      </form>
    );
  }
  return (
    <>
      {!state.ok && state.message ? <Notice tone="danger" testId="deactivate-error" className="mb-3">{state.message}</Notice> : null}
      <Dialog trigger="Deactivate…" triggerVariant="danger" title={`Deactivate ${name}?`} description="They are signed out everywhere at once and cannot sign in until reactivated. Their records stay.">
        <form action={action} className="flex flex-col gap-4" data-testid="deactivate-form">
          <input type="hidden" name="userId" value={userId} />
          <TextField label="Why" name="reason" hint="For example: left the workshop." />
          <SubmitButton variant="danger" pendingLabel="Deactivating…">Deactivate now</SubmitButton>
        </form>
      </Dialog>
    </>
  );
}
