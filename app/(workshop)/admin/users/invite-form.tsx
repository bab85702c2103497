"use client";
import { useState } from "react";
import { useActionStateThen } from "@/components/ui/kept-form";
import { Dialog } from "@/components/ui/dialog";
import { CheckboxGroup, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { useToast } from "@/components/ui/toast";
import { ROLE_LABELS, ROLES } from "@/lib/auth/roles";
import { initialFormState } from "@/lib/form-state";
import { inviteAction } from "./actions/invite";

const roleOptions = ROLES.map((r) => ({ value: r, label: ROLE_LABELS[r] }));

export function InviteDialog() {
  const [open, setOpen] = useState(false);
  const toast = useToast();
  const [state, action] = useActionStateThen(inviteAction, initialFormState, (s) => {
    if (s.message) toast(s.message);
    setOpen(false);
  });
  const v = (k: string) => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : "");
  const roles = state.ok ? [] : ([] as string[]).concat(state.values?.roles ?? []);
  return (
    <Dialog open={open} onOpenChange={setOpen} trigger="Invite someone" triggerVariant="primary" title="Invite someone" description="They get an e-mail with a link, valid for 72 hours, to choose their password.">
      <form action={action} className="flex flex-col gap-4" noValidate data-testid="invite-form">
        {!state.ok && state.message ? <Notice tone="danger">{state.message}</Notice> : null}
        <TextField label="Name" name="name" autoComplete="off" defaultValue={state.ok ? "" : v("name")} errors={state.fieldErrors?.name} required />
        <TextField label="E-mail" name="email" type="email" autoComplete="off" defaultValue={state.ok ? "" : v("email")} errors={state.fieldErrors?.email} required />
        <CheckboxGroup legend="Roles" name="roles" options={roleOptions} defaultValues={roles} errors={state.fieldErrors?.roles} columns={2} />
        <SubmitButton pendingLabel="Sending…">Send invitation</SubmitButton>
      </form>
    </Dialog>
  );
}
