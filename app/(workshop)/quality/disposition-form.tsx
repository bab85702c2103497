"use client";
import { useActionState, useState } from "react";
import { SelectField, TextField } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { dispositionAction } from "./actions";

/** Quality's one decision on a nonconformance. `back` is the page to return to (a path of this site). */
export function DispositionForm({ nc, steps, sides, back }: { nc: { id: string; code: string; seq: number; entryError?: { words: string; reason: string } | null }; steps: { seq: number; name: string }[]; sides: { side: "L" | "R"; identity: string }[]; back: string }) {
  const [state, action] = useActionState(dispositionAction, initialFormState);
  const [kind, setKind] = useState("");
  return (
    <form action={action} className="flex flex-col gap-4 rounded-lg border border-line p-4" data-testid={`disposition-${nc.code}`}>
      {/* Success returns to the page, which says what was recorded; only a refusal shows here. */}
      {!state.ok && state.message ? (
        <Notice tone="danger" testId={`disposition-refused-${nc.code}`}>
          {state.message}
          {state.fieldErrors?.back?.[0] ? ` ${state.fieldErrors.back[0]}` : ""}
        </Notice>
      ) : null}
      {nc.entryError ? (
        <Notice tone="info" testId={`entry-error-${nc.code}`}>
          The reading was corrected: {nc.entryError.words} ({nc.entryError.reason}). Every reading of the step is now inside its window: if it was only a typing slip, close it as an entry error.
        </Notice>
      ) : null}
      <input type="hidden" name="ncId" value={nc.id} />
      <input type="hidden" name="back" value={back} />
      <div className="grid gap-4 sm:grid-cols-3">
        <SelectField
          label="Disposition"
          name="disposition"
          value={kind}
          onChange={(e) => setKind(e.target.value)}
          options={
            nc.seq === 0
              ? [
                  { value: "", label: "Choose…" },
                  { value: "rework", label: "Rework: adjust and test again" },
                  { value: "use_as_is", label: "Use as is (deviation)" },
                ]
              : [
                  { value: "", label: "Choose…" },
                  ...(nc.entryError ? [{ value: "entry_error", label: "Entry error: mistyped, now corrected" }] : []),
                  { value: "rework", label: "Rework: back to a step" },
                  { value: "use_as_is", label: "Use as is (deviation)" },
                  { value: "scrap", label: "Scrap one cabinet" },
                ]
          }
          errors={state.fieldErrors?.disposition}
        />
        {kind === "rework" && nc.seq > 0 ? (
          <SelectField label="Back to step" name="reworkToSeq" defaultValue={String(nc.seq)} options={steps.map((s) => ({ value: String(s.seq), label: `${s.seq}. ${s.name}` }))} errors={state.fieldErrors?.reworkToSeq} />
        ) : null}
        {kind === "scrap" ? (
          <SelectField label={sides.length === 1 ? "To scrap" : "Cabinet to scrap"} name="scrapSide" options={[{ value: "", label: "Choose…" }, ...sides.map((s) => ({ value: s.side, label: sides.length === 1 ? s.identity : `${s.side === "L" ? "Left" : "Right"} ${s.identity}` }))]} errors={state.fieldErrors?.scrapSide} />
        ) : null}
      </div>
      <TextField label={kind === "use_as_is" ? "Reason for the deviation (you approve it)" : kind === "entry_error" ? "Why it was only a typing slip (you approve it)" : "Reason"} name="reason" errors={state.fieldErrors?.reason} />
      <div>
        <SubmitButton pendingLabel="Recording…" variant={kind === "scrap" ? "danger" : "primary"}>
          Record the disposition of {nc.code}
        </SubmitButton>
      </div>
    </form>
  );
}
