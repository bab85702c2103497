"use client";
import { useActionState, useState } from "react";
import { Notice } from "@/components/ui/notice";
import { TextAreaField } from "@/components/ui/field";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState, type FormState } from "@/lib/form-state";
import { CASE_STATE_WORDS, type CaseState } from "@/lib/vocabulary/case-states";

export interface MoveChoice {
  to: CaseState;
  /** Whether the desk must say why (a cancellation, a step back). */
  needsReason: boolean;
  hint?: string;
}

/** One form per move the state table allows from here; the reason box where a reason is needed. */
function MoveForm({ code, from, choice, action }: { code: string; from: CaseState; choice: MoveChoice; action: (s: FormState, f: FormData) => Promise<FormState> }) {
  const [state, formAction] = useActionState(action, initialFormState);
  const [reason, setReason] = useState("");
  const errors = !state.ok ? state.fieldErrors : undefined;
  const danger = choice.to === "cancelled";
  return (
    <form action={formAction} className="flex flex-col gap-2 rounded-lg border border-line p-3" data-testid={`move-${choice.to}`}>
      <input type="hidden" name="code" value={code} />
      <input type="hidden" name="from" value={from} />
      <input type="hidden" name="to" value={choice.to} />
      {choice.needsReason ? <TextAreaField label="Why" name="reason" rows={2} value={reason} onChange={(e) => setReason(e.currentTarget.value)} errors={errors?.reason} maxLength={500} /> : null}
      {choice.hint ? <p className="text-sm text-ink-soft">{choice.hint}</p> : null}
      {!state.ok && state.message && !errors?.reason ? (
        <Notice tone="danger" testId={`move-${choice.to}-error`}>
          {state.message}
        </Notice>
      ) : null}
      <div>
        <SubmitButton variant={danger ? "danger" : "primary"} pendingLabel="Saving…">
          {danger ? "Cancel the case" : `Mark “${CASE_STATE_WORDS[choice.to]}”`}
        </SubmitButton>
      </div>
    </form>
  );
}

export function CaseMoves({ code, from, choices, action }: { code: string; from: CaseState; choices: MoveChoice[]; action: (s: FormState, f: FormData) => Promise<FormState> }) {
  if (choices.length === 0) return null;
  return (
    <div className="grid gap-3 sm:grid-cols-2" data-testid="case-moves">
      {choices.map((c) => (
        <MoveForm key={c.to} code={code} from={from} choice={c} action={action} />
      ))}
    </div>
  );
}
