"use client";
import { useActionState } from "react";
import { TextAreaField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { retireDealerAction, saveDealerAction } from "./actions";

export interface DealerValues {
  id: string | null;
  code: string;
  name: string;
  address: string;
  postcode: string;
  city: string;
  country: string;
  email: string;
}

/** Add a dealer, or edit one: the delivery address as it goes on a label, the country as its ISO code. */
export function DealerForm({ initial, codeFixed }: { initial: DealerValues; codeFixed: string | null }) {
  const [state, action] = useActionState(saveDealerAction, initialFormState);
  const v = (k: keyof DealerValues) => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : String(initial[k] ?? ""));
  const fe = state.fieldErrors;
  return (
    <form action={action} className="flex flex-col gap-4" noValidate data-testid="dealer-form">
      {!state.ok && state.message ? <Notice tone="danger" testId="dealer-form-error">{state.message}</Notice> : null}
      {initial.id ? <input type="hidden" name="dealerId" value={initial.id} /> : null}
      <div className="grid gap-4 sm:grid-cols-3">
        {codeFixed ? (
          <>
            <input type="hidden" name="code" value={initial.code} />
            <TextField label="Code" name="code-shown" value={initial.code} readOnly hint={codeFixed} />
          </>
        ) : (
          <TextField label="Code" name="code" defaultValue={v("code")} hint="2 to 4 capitals or digits, e.g. MLR." errors={fe?.code} autoComplete="off" data-testid="dealer-code" />
        )}
        <div className="sm:col-span-2">
          <TextField label="Name" name="name" defaultValue={v("name")} errors={fe?.name} autoComplete="off" data-testid="dealer-name" />
        </div>
      </div>
      <TextAreaField label="Street address" name="address" rows={3} defaultValue={v("address")} hint="One line per line of the delivery label." errors={fe?.address} data-testid="dealer-address" />
      <div className="grid gap-4 sm:grid-cols-3">
        <TextField label="Postcode" name="postcode" defaultValue={v("postcode")} errors={fe?.postcode} autoComplete="off" data-testid="dealer-postcode" />
        <TextField label="Town or city" name="city" defaultValue={v("city")} errors={fe?.city} autoComplete="off" data-testid="dealer-city" />
        <TextField label="Country" name="country" defaultValue={v("country")} hint="Two-letter ISO 3166-1 code: GB, FR, DE…" errors={fe?.country} autoComplete="off" maxLength={2} className="uppercase" data-testid="dealer-country" />
      </div>
      <TextField label="E-mail" name="email" type="email" defaultValue={v("email")} hint="Where shipping notices and containment notices go." errors={fe?.email} autoComplete="off" data-testid="dealer-email" />
      <div>
        <SubmitButton pendingLabel="Saving…">{initial.id ? "Save the dealer" : "Add the dealer"}</SubmitButton>
      </div>
    </form>
  );
}

/** Mark a dealer inactive (shipping no longer offers it), or active again, with the reason. */
export function RetireDealerForm({ dealerId, name, active }: { dealerId: string; name: string; active: boolean }) {
  const [state, action] = useActionState(retireDealerAction, initialFormState);
  return (
    <form action={action} className="flex flex-col gap-3" noValidate data-testid="retire-dealer-form">
      {state.message ? <Notice tone={state.ok ? "leaf" : "danger"}>{state.message}</Notice> : null}
      <input type="hidden" name="dealerId" value={dealerId} />
      <input type="hidden" name="active" value={active ? "false" : "true"} />
      <TextField label="Why" name="reason" errors={state.fieldErrors?.reason} defaultValue={state.ok ? "" : typeof state.values?.reason === "string" ? state.values.reason : ""} />
      <div>
        <SubmitButton variant={active ? "danger" : "primary"} pendingLabel="Saving…">
          {active ? `Mark ${name} inactive` : `Mark ${name} active`}
        </SubmitButton>
      </div>
    </form>
  );
}
