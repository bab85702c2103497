"use client";
import { useActionState, useState } from "react";
import { controlClasses } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import { TS_CSV_TEMPLATE } from "@/lib/lab/ts-csv-template";
import { tsCsvAction } from "../../actions/batches";

const fileClasses = `${controlClasses} py-2.5 file:mr-3 file:rounded-md file:border-0 file:bg-leaf-soft file:px-3 file:py-1.5 file:font-bold file:text-leaf-dark`;

/** Thiele–Small parameters for the whole batch from a pasted or chosen CSV. */
export function TsCsvImport({ batch }: { batch: string }) {
  const [text, setText] = useState("");
  const [state, action] = useActionState(tsCsvAction, initialFormState);
  return (
    <form action={action} className="flex flex-col gap-3" data-testid="ts-csv-import">
      {state.ok && state.message ? <Notice tone="leaf" testId="ts-csv-done">{state.message}</Notice> : null}
      {!state.ok && state.message ? (
        <Notice tone="danger" testId="ts-csv-error">
          {state.message}
          {state.fieldErrors?.csv ? (
            // Every problem of the file at once: a long list scrolls rather than pushing the form away.
            <ul className="mt-1 max-h-72 list-disc overflow-y-auto pl-5" data-testid="ts-csv-problems" tabIndex={0} aria-label="Problems in the CSV">
              {state.fieldErrors.csv.map((p, i) => (
                <li key={`${i}-${p}`}>{p}</li>
              ))}
            </ul>
          ) : null}
        </Notice>
      ) : null}
      <input type="hidden" name="batch" value={batch} />
      <p className="text-ink-soft">
        Columns: <code>{TS_CSV_TEMPLATE.trim()}</code>. The serial is the Twinleaf serial or the maker’s. Every row is checked before anything is saved, and every problem is listed at once.
      </p>
      <label className="flex flex-col gap-1">
        <span className="font-bold">Choose a CSV file</span>
        <input type="file" accept=".csv,.txt,text/csv,text/plain" className={fileClasses} onChange={async (e) => setText((await e.currentTarget.files?.[0]?.text()) ?? "")} />
      </label>
      <label className="flex flex-col gap-1">
        <span className="font-bold">…or paste it here</span>
        <textarea name="csv" rows={6} value={text} onChange={(e) => setText(e.target.value)} spellCheck={false} className="rounded-md border border-line-strong bg-surface p-2 font-mono text-sm" />
      </label>
      <div>
        <SubmitButton pendingLabel="Checking and saving…" disabled={!text.trim()}>
          Save parameters
        </SubmitButton>
      </div>
    </form>
  );
}
