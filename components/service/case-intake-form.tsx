"use client";
import { useState } from "react";
import { Notice } from "@/components/ui/notice";
import { SelectField, TextAreaField, TextField } from "@/components/ui/field";
import { SubmitButton } from "@/components/ui/submit-button";
import { submitKeepingFields, useActionStateThen } from "@/components/ui/kept-form";
import { initialFormState, type FormState } from "@/lib/form-state";

export interface IntakeOwnerOption {
  id: string;
  label: string;
}

/**
 * The intake form. Every field is held in state, so what was typed stays when the desk is told
 * what to correct; each refusal is shown next to its field.
 */
export function CaseIntakeForm({
  action,
  today,
  serial: initialSerial,
  owners,
  dealers,
  shippedDealer,
}: {
  action: (state: FormState, formData: FormData) => Promise<FormState>;
  today: string;
  serial: string;
  owners: IntakeOwnerOption[];
  dealers: { code: string; label: string }[];
  shippedDealer: string | null;
}) {
  const [serial, setSerial] = useState(initialSerial);
  const [receivedOn, setReceivedOn] = useState(today);
  const [returnedBy, setReturnedBy] = useState<"owner" | "dealer">("owner");
  const [dealerCode, setDealerCode] = useState("");
  const [symptom, setSymptom] = useState("");
  const [ownerMode, setOwnerMode] = useState<"record" | "new" | "none">(owners.length ? "record" : "new");
  const [ownerId, setOwnerId] = useState(owners[0]?.id ?? "");
  const [name, setName] = useState("");
  const [email, setEmail] = useState("");
  const [town, setTown] = useState("");
  const [country, setCountry] = useState("");
  const [consent, setConsent] = useState<"" | "yes" | "no">("");
  const [state, formAction, pending] = useActionStateThen(action, initialFormState, () => {});
  const submit = submitKeepingFields(formAction, pending);
  const errors = (f: string) => (!state.ok ? state.fieldErrors?.[f] : undefined);

  return (
    <form onSubmit={submit} className="flex flex-col gap-5" data-testid="intake-form" noValidate>
      {!state.ok && state.message ? (
        <Notice tone="danger" testId="intake-error">
          {state.message}
        </Notice>
      ) : null}
      <TextField label="Serial of the speaker or pair" name="serial" value={serial} onChange={(e) => setSerial(e.currentTarget.value)} errors={errors("serial")} hint="Scan the label or type it; case, spaces and missing hyphens do not matter." autoComplete="off" />
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField label="Received on" type="date" name="receivedOn" value={receivedOn} max={today} onChange={(e) => setReceivedOn(e.currentTarget.value)} errors={errors("receivedOn")} />
        <SelectField
          label="Sent back by"
          name="returnedBy"
          value={returnedBy}
          onChange={(e) => setReturnedBy(e.currentTarget.value as "owner" | "dealer")}
          errors={errors("returnedBy")}
          options={[
            { value: "owner", label: "The owner" },
            { value: "dealer", label: "The dealer" },
          ]}
        />
      </div>
      <SelectField
        label="Dealer"
        name="dealerCode"
        value={dealerCode}
        onChange={(e) => setDealerCode(e.currentTarget.value)}
        errors={errors("dealerCode")}
        hint="The dealer it was shipped to is taken from the register unless you choose another."
        options={[{ value: "", label: shippedDealer ? `As shipped: ${shippedDealer}` : "As shipped (from the register)" }, ...dealers.map((d) => ({ value: d.code, label: d.label }))]}
      />
      <TextAreaField label="Reported symptom" name="symptom" rows={3} value={symptom} onChange={(e) => setSymptom(e.currentTarget.value)} errors={errors("symptom")} maxLength={2000} />

      <fieldset className="flex flex-col gap-3 rounded-xl border border-line p-4">
        <legend className="px-1 font-bold">Owner</legend>
        <div className="flex flex-wrap gap-4" role="radiogroup" aria-label="Owner">
          {(
            [
              ["record", "On record"],
              ["new", "New owner"],
              ["none", "Not known"],
            ] as const
          ).map(([v, label]) => (
            <label key={v} className="flex min-h-12 items-center gap-2">
              <input type="radio" name="ownerMode" value={v} checked={ownerMode === v} onChange={() => setOwnerMode(v)} className="size-5 accent-leaf" />
              {label}
            </label>
          ))}
        </div>
        {ownerMode === "record" ? (
          owners.length ? (
            <SelectField label="Owner on record" name="ownerId" value={ownerId} onChange={(e) => setOwnerId(e.currentTarget.value)} errors={errors("ownerId")} options={owners.map((o) => ({ value: o.id, label: o.label }))} />
          ) : (
            <p className="text-sm text-ink-soft" data-testid="no-owner-options">
              No owner found yet: look the serial up, or search owners by name or e-mail above.
              {errors("ownerId") ? <span className="block font-bold text-danger">{errors("ownerId")!.join(" ")}</span> : null}
            </p>
          )
        ) : null}
        {ownerMode === "new" ? (
          <div className="grid gap-4 sm:grid-cols-2">
            <TextField label="Name" name="owner.name" value={name} onChange={(e) => setName(e.currentTarget.value)} errors={errors("owner.name")} autoComplete="off" />
            <TextField label="E-mail (optional)" type="email" name="owner.email" value={email} onChange={(e) => setEmail(e.currentTarget.value)} errors={errors("owner.email")} autoComplete="off" />
            <TextField label="Town" name="owner.town" value={town} onChange={(e) => setTown(e.currentTarget.value)} errors={errors("owner.town")} />
            <TextField label="Country (two letters, e.g. GB)" name="owner.country" value={country} maxLength={2} onChange={(e) => setCountry(e.currentTarget.value.toUpperCase())} errors={errors("owner.country")} />
            <SelectField
              label="May we contact the owner about this case?"
              name="owner.consent"
              value={consent}
              onChange={(e) => setConsent(e.currentTarget.value as "" | "yes" | "no")}
              errors={errors("owner.consent")}
              options={[
                { value: "", label: "Choose…" },
                { value: "yes", label: "Yes, by e-mail" },
                { value: "no", label: "No" },
              ]}
            />
          </div>
        ) : null}
        {ownerMode === "none" && returnedBy === "owner" ? <p className="text-sm text-ink-soft">The owner sent it back: pick them on record or give their particulars.</p> : null}
        {ownerMode === "none" && errors("ownerId") ? <p className="text-sm font-bold text-danger">{errors("ownerId")!.join(" ")}</p> : null}
      </fieldset>
      <div>
        <SubmitButton pendingLabel="Opening the case…" data-testid="open-case">
          Open the case
        </SubmitButton>
      </div>
    </form>
  );
}
