"use client";
import { useActionState } from "react";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { openPairAction } from "./actions";

/** Scan a pair, cabinet or speaker label to open the pair at the assembly station. */
export function ScanForm() {
  const [state, action] = useActionState(openPairAction, initialFormState);
  const error = !state.ok && state.message ? (state.fieldErrors?.code?.[0] && state.fieldErrors.code[0] !== state.message ? `${state.message} ${state.fieldErrors.code[0]}` : state.message) : null;
  return (
    <form action={action} className="flex flex-wrap items-end gap-3" data-testid="assembly-scan-form">
      <label className="flex flex-col gap-1">
        <span className="font-bold">Scan a pair or cabinet label</span>
        <input name="code" autoComplete="off" autoFocus spellCheck={false} className="serial h-12 w-80 rounded-md border border-line-strong bg-surface px-3" aria-describedby={error ? "assembly-scan-error" : undefined} aria-invalid={error ? true : undefined} />
      </label>
      <SubmitButton pendingLabel="Finding…">Open</SubmitButton>
      {error ? (
        <div id="assembly-scan-error" className="w-full">
          <Notice tone="danger">{error}</Notice>
        </div>
      ) : null}
    </form>
  );
}
