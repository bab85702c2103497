"use client";
import { useActionState } from "react";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { scanAction } from "./actions/steps";

/** Scan a cabinet, pair or trim-part label to open its route at this station. */
export function ScanForm({ station = "" }: { station?: string }) {
  const [state, action] = useActionState(scanAction, initialFormState);
  return (
    <form action={action} className="flex flex-wrap items-end gap-3" data-testid="scan-form">
      <input type="hidden" name="station" value={station} />
      <label className="flex flex-col gap-1">
        <span className="font-bold">Scan a cabinet, pair or trim-part label</span>
        <input name="code" autoComplete="off" autoFocus className="serial h-12 w-80 rounded-md border border-line-strong bg-surface px-3" aria-describedby="scan-error" />
      </label>
      <SubmitButton pendingLabel="Finding…">Open</SubmitButton>
      {!state.ok && state.message ? (
        <div id="scan-error" className="w-full">
          <Notice tone="danger">{state.fieldErrors?.code?.[0] ? `${state.message} ${state.fieldErrors.code[0]}` : state.message}</Notice>
        </div>
      ) : null}
    </form>
  );
}
