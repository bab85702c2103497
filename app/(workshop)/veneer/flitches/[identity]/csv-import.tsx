"use client";
import { useActionState, useEffect, useState } from "react";
import { controlClasses } from "@/components/ui/field";
import { Notice } from "@/components/ui/notice";
import { SubmitButton } from "@/components/ui/submit-button";
import { initialFormState } from "@/lib/form-state";
import type { LeafCsvResult } from "@/lib/veneer/csv";
import { importLeavesAction } from "../../actions/leaves";

// The parser (papaparse) loads only once someone starts on a CSV, not with the flitch page.
const loadCsv = () => import("@/lib/veneer/csv");

/** Paste or choose a CSV; it is checked as you go, and the server checks it again before writing all of it. */
export function CsvImport({ flitch, leafCount }: { flitch: string; leafCount: number }) {
  const [text, setText] = useState("");
  const [tooBig, setTooBig] = useState(false);
  const [state, action] = useActionState(importLeavesAction, initialFormState);
  // The check of the text now in the box; a check of an older text is not shown.
  const [checked, setChecked] = useState<{ text: string; leafCount: number; result: LeafCsvResult } | null>(null);
  useEffect(() => {
    if (!text.trim()) return;
    void loadCsv().then(({ parseLeafCsv }) => setChecked({ text, leafCount, result: parseLeafCsv(text, { leafCount }) }));
  }, [text, leafCount]);
  const preview = text.trim() && checked?.text === text && checked.leafCount === leafCount ? checked.result : null;
  const serverErrors = state.ok ? [] : (state.fieldErrors?.csv ?? []);
  const onFile = async (file: File | undefined) => {
    if (!file) return;
    setTooBig(false);
    if (file.size > 200_000) {
      setText("");
      setTooBig(true);
      return;
    }
    setText(await file.text());
  };
  return (
    <form action={action} className="flex flex-col gap-4" data-testid="csv-import">
      <input type="hidden" name="flitch" value={flitch} />
      {state.ok && state.message ? <Notice tone="leaf" testId="csv-done">{state.message}</Notice> : null}
      {!state.ok && state.message ? (
        <Notice tone="danger" testId="csv-error">
          {state.message}
          {serverErrors.length ? (
            <ul className="mt-2 list-disc pl-5">
              {serverErrors.map((e) => (
                <li key={e}>{e}</li>
              ))}
            </ul>
          ) : null}
        </Notice>
      ) : null}
      <p className="text-ink-soft">
        Columns: <code>seq</code> (required), <code>length_mm</code>, <code>width_mm</code>, <code>usable</code> (yes/no), <code>defect</code>, <code>defect_note</code>, <code>defect_position_mm</code>. Comma, semicolon or tab separated.{" "}
        <button type="button" className="font-bold text-leaf-dark underline" onClick={() => void loadCsv().then(({ LEAF_CSV_TEMPLATE }) => setText(LEAF_CSV_TEMPLATE(leafCount)))}>
          Start from a template
        </button>
      </p>
      <label className="flex flex-col gap-1">
        <span className="font-bold">Choose a CSV file</span>
        <input type="file" accept=".csv,.txt,text/csv,text/plain" onChange={(e) => onFile(e.target.files?.[0])} className={`${controlClasses} py-2.5 file:mr-3 file:rounded-md file:border-0 file:bg-leaf-soft file:px-3 file:py-1.5 file:font-bold file:text-leaf-dark`} />
      </label>
      <label className="flex flex-col gap-1">
        <span className="font-bold">…or paste it here</span>
        <textarea name="csv" value={text} onChange={(e) => setText(e.target.value)} rows={8} spellCheck={false} className="rounded-md border border-line-strong bg-surface p-2 font-mono text-sm" />
      </label>
      {tooBig ? <Notice tone="danger">That file is larger than 200 kB; a leaf table is much smaller. Check you chose the right file.</Notice> : null}
      {preview ? (
        preview.ok ? (
          <p className="text-leaf-dark" role="status" data-testid="csv-preview">
            {preview.rows.length} rows look right.
          </p>
        ) : (
          <div role="status" data-testid="csv-preview">
            <p className="font-bold text-danger">{preview.errors.length} problem{preview.errors.length === 1 ? "" : "s"} to fix before importing:</p>
            <ul className="list-disc pl-5 text-danger">
              {preview.errors.slice(0, 12).map((e, i) => (
                <li key={i}>
                  Line {e.line}
                  {e.column ? ` (${e.column})` : ""}: {e.message}
                </li>
              ))}
            </ul>
          </div>
        )
      ) : null}
      <div>
        <SubmitButton pendingLabel="Importing…" disabled={!preview?.ok}>
          Import leaves
        </SubmitButton>
      </div>
    </form>
  );
}
