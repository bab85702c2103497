"use client";
import { useActionState, useState } from "react";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { VENEER_CUT_WORDS, VENEER_CUTS } from "@/lib/vocabulary/veneer-cuts";
import { retireFinishAction, saveFinishAction } from "./actions";

export interface FinishValues {
  id: string | null;
  kind: "veneer" | "lacquer";
  code: string;
  name: string;
  botanicalName: string;
  cut: string;
  colourRef: string;
  detail: string;
}

/** Add a finish, or edit one: a veneer species (botanical name, cut) or a lacquer colour (its reference). */
export function FinishForm({ initial, codeFixed }: { initial: FinishValues; codeFixed: string | null }) {
  const [state, action] = useActionState(saveFinishAction, initialFormState);
  const v = (k: keyof FinishValues) => (typeof state.values?.[k] === "string" ? (state.values[k] as string) : String(initial[k] ?? ""));
  const [kind, setKind] = useState<"veneer" | "lacquer">(initial.kind);
  const fe = state.fieldErrors;
  return (
    <form action={action} className="flex flex-col gap-4" noValidate data-testid="finish-form">
      {!state.ok && state.message ? <Notice tone="danger" testId="finish-form-error">{state.message}</Notice> : null}
      {initial.id ? <input type="hidden" name="finishId" value={initial.id} /> : null}
      <div className="grid gap-4 sm:grid-cols-3">
        <SelectField
          label="Kind"
          name="kind"
          value={kind}
          onChange={(e) => setKind(e.target.value as "veneer" | "lacquer")}
          options={[
            { value: "veneer", label: "Veneer species" },
            { value: "lacquer", label: "Lacquer colour" },
          ]}
          errors={fe?.kind}
          disabled={Boolean(codeFixed)}
        />
        {codeFixed ? <input type="hidden" name="kind" value={kind} /> : null}
        {codeFixed ? (
          <>
            <input type="hidden" name="code" value={initial.code} />
            <TextField label="Code" name="code-shown" value={initial.code} readOnly hint={codeFixed} />
          </>
        ) : (
          <TextField label="Code" name="code" defaultValue={v("code")} hint="2 to 4 capitals or digits, e.g. WAL." errors={fe?.code} autoComplete="off" data-testid="finish-code" />
        )}
        <TextField label={kind === "veneer" ? "Trade name" : "Colour name"} name="name" defaultValue={v("name")} errors={fe?.name} autoComplete="off" data-testid="finish-name" />
      </div>
      {kind === "veneer" ? (
        <div className="grid gap-4 sm:grid-cols-2">
          <TextField label="Botanical name" name="botanicalName" defaultValue={v("botanicalName")} hint="e.g. Juglans nigra" errors={fe?.botanicalName} className="italic" />
          <SelectField label="Cut" name="cut" defaultValue={v("cut")} options={[{ value: "", label: "Not recorded" }, ...VENEER_CUTS.map((c) => ({ value: c, label: VENEER_CUT_WORDS[c] }))]} errors={fe?.cut} />
        </div>
      ) : (
        <TextField label="Colour reference" name="colourRef" defaultValue={v("colourRef")} hint="An sRGB hex such as #3E4A52 (shown as a swatch), or a colour-card reference such as RAL 7016." errors={fe?.colourRef} className="font-mono" data-testid="finish-colour" />
      )}
      <TextField label="Note (optional)" name="detail" defaultValue={v("detail")} hint={kind === "veneer" ? "e.g. figured" : "e.g. satin, high gloss"} errors={fe?.detail} />
      <div>
        <SubmitButton pendingLabel="Saving…">{initial.id ? "Save the finish" : "Add the finish"}</SubmitButton>
      </div>
    </form>
  );
}

/** Retire a finish from new work, or bring it back, with the reason. */
export function RetireFinishForm({ finishId, name, active }: { finishId: string; name: string; active: boolean }) {
  const [state, action] = useActionState(retireFinishAction, initialFormState);
  return (
    <form action={action} className="flex flex-col gap-3" noValidate data-testid="retire-finish-form">
      {state.message ? <Notice tone={state.ok ? "leaf" : "danger"} testId="retire-finish-message">{state.message}</Notice> : null}
      <input type="hidden" name="finishId" value={finishId} />
      <input type="hidden" name="active" value={active ? "false" : "true"} />
      <TextField label="Why" name="reason" errors={state.fieldErrors?.reason} defaultValue={state.ok ? "" : typeof state.values?.reason === "string" ? state.values.reason : ""} data-testid="retire-finish-reason" />
      <div>
        <SubmitButton variant={active ? "danger" : "primary"} pendingLabel="Saving…">
          {active ? `Retire ${name}` : `Bring ${name} back`}
        </SubmitButton>
      </div>
    </form>
  );
}
