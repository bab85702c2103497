"use client";
import { useState } from "react";
import { Notice } from "@/components/ui/notice";
import { SelectField, TextField } from "@/components/ui/field";
import { SubmitButton } from "@/components/ui/submit-button";
import { submitKeepingFields, useActionStateThen } from "@/components/ui/kept-form";
import { initialFormState, type FormState } from "@/lib/form-state";

/** Marks a failed position of a speaker that came back, with what was found. */
export function CaseFindingForm({
  code,
  sides,
  positions,
  action,
}: {
  code: string;
  sides: { value: "L" | "R"; label: string }[];
  positions: { value: string; label: string }[];
  action: (s: FormState, f: FormData) => Promise<FormState>;
}) {
  const [side, setSide] = useState(sides[0]?.value ?? "L");
  const [position, setPosition] = useState(positions[0]?.value ?? "");
  const [finding, setFinding] = useState("");
  const [state, formAction, pending] = useActionStateThen(action, initialFormState, () => setFinding(""));
  const submit = submitKeepingFields(formAction, pending);
  const errors = (f: string) => (!state.ok ? state.fieldErrors?.[f] : undefined);
  return (
    <form onSubmit={submit} className="flex flex-col gap-3" data-testid="finding-form" noValidate>
      <input type="hidden" name="code" value={code} />
      {state.ok && state.message ? <Notice tone="info">{state.message}</Notice> : null}
      {!state.ok && state.message ? <Notice tone="danger" testId="finding-error">{state.message}</Notice> : null}
      <div className="grid gap-3 sm:grid-cols-3">
        <SelectField label="Speaker" name="side" value={side} onChange={(e) => setSide(e.currentTarget.value as "L" | "R")} errors={errors("side")} options={sides} />
        <SelectField label="Position" name="position" value={position} onChange={(e) => setPosition(e.currentTarget.value)} errors={errors("position")} options={positions} />
        <TextField label="What was found" name="finding" value={finding} onChange={(e) => setFinding(e.currentTarget.value)} errors={errors("finding")} maxLength={500} placeholder="e.g. no output above 3 kHz" />
      </div>
      <div>
        <SubmitButton variant="secondary" pendingLabel="Recording…">
          Record the finding
        </SubmitButton>
      </div>
    </form>
  );
}
