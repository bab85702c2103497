"use client";
import { useActionState } from "react";
import { TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { registerOwnerAction } from "./actions";

/** The owner's registration of the pair on the certificate check; the answer never says more than that mail may be on its way. */
export function OwnerRegistrationForm({ code }: { code: string }) {
  const [state, action] = useActionState(registerOwnerAction, initialFormState);
  if (state.ok) return <Notice tone="leaf" testId="registration-sent">{state.message}</Notice>;
  const v = (k: string) => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : undefined);
  return (
    <form action={action} className="flex flex-col gap-4" noValidate data-testid="registration-form">
      {state.message ? <Notice tone="danger">{state.message}</Notice> : null}
      <input type="hidden" name="code" value={code} />
      <TextField label="Your name" name="name" autoComplete="name" defaultValue={v("name")} errors={state.fieldErrors?.name} required />
      <TextField label="E-mail" name="email" type="email" autoComplete="email" defaultValue={v("email")} errors={state.fieldErrors?.email} hint="We send a link here; the registration counts once you open it." required />
      <TextField label="Town" name="town" autoComplete="address-level2" defaultValue={v("town")} errors={state.fieldErrors?.town} required />
      <TextField label="Country" name="country" autoComplete="country" defaultValue={v("country")} errors={state.fieldErrors?.country} hint="Two letters, e.g. GB, DE, US." maxLength={2} className="w-24 uppercase" required />
      <label className="flex min-h-12 items-start gap-3">
        <input type="checkbox" name="consent" defaultChecked={v("consent") === "on"} className="mt-1 h-5 w-5 shrink-0" data-testid="registration-consent" />
        <span>Send me recall notices and service mail about this pair. You can withdraw this at any time from a link in every message.</span>
      </label>
      <SubmitButton pendingLabel="Sending…">Register my pair</SubmitButton>
    </form>
  );
}
